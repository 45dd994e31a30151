import type { Equipment } from '../../../../shared/schemas/equipment.ts';
import { ButtonLink } from '@/components/ui/button';
import { useTransferCandidates } from '@/features/transfers/api/transfers';
import { cellarPaths } from '@/config/cellar-paths';
import { useAppAbility } from '@/lib/ability';

/**
 * The cellar-operation buttons on a vessel's page (the one its QR label opens): record a cycle,
 * the keg's own page, a transfer out of a full fermenter.
 */
export const VesselCellarActions = ({ item }: { item: Pick<Equipment, 'id' | 'kind' | 'state'> }) => {
  const ability = useAppAbility();
  const canTransfer = item.kind === 'fermenter' && item.state === 'holding' && ability.can('create', 'Transfer');
  // The batch this fermenter holds (its latest booking's), so the transfer form opens with it chosen.
  const candidates = useTransferCandidates(canTransfer);
  const held = candidates.data?.find((c) => c.fermenter?.id === item.id);
  if (item.kind !== 'keg' && item.kind !== 'fermenter') return null;
  const big = 'min-h-12 md:min-h-12 pointer-coarse:min-h-12 px-5 text-base';
  return (
    <>
      {ability.can('create', 'SanitationCycle') && item.state !== 'holding' && item.state !== 'out_of_service' ? (
        <ButtonLink to={cellarPaths.recordCycle(item.id)} variant="primary" className={big}>
          Record a cycle
        </ButtonLink>
      ) : null}
      {canTransfer ? (
        <ButtonLink to={cellarPaths.newTransfer(held ? { batchId: held.batchId } : {})} variant="primary" className={`${big} max-w-full`}>
          <span className="whitespace-normal">{held ? `Transfer ${held.name} to kegs` : 'Transfer to kegs'}</span>
        </ButtonLink>
      ) : null}
      {item.kind === 'keg' && ability.can('read', 'Keg') ? (
        <ButtonLink to={cellarPaths.keg(item.id)} variant="secondary" className={big}>
          Keg page
        </ButtonLink>
      ) : null}
    </>
  );
};
