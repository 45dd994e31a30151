import type { Equipment } from '../../../../shared/schemas/equipment.ts';
import { ButtonLink } from '@/components/ui/button';
import { cellarPaths } from '@/features/cellar-ops/paths';
import { useAppAbility } from '@/lib/ability';

/**
 * The cellar-operation buttons on a vessel's page (the one its QR label opens): record a cycle,
 * the keg's own page, a transfer out of a full fermenter.
 */
export const VesselCellarActions = ({ item }: { item: Pick<Equipment, 'id' | 'kind' | 'state'> }) => {
  const ability = useAppAbility();
  if (item.kind !== 'keg' && item.kind !== 'fermenter') return null;
  const big = 'min-h-12 md:min-h-12 pointer-coarse:min-h-12 px-5 text-base';
  return (
    <>
      {ability.can('create', 'SanitationCycle') && item.state !== 'holding' && item.state !== 'out_of_service' ? (
        <ButtonLink to={cellarPaths.recordCycle(item.id)} variant="primary" className={big}>
          Record a cycle
        </ButtonLink>
      ) : null}
      {item.kind === 'fermenter' && item.state === 'holding' && ability.can('create', 'Transfer') ? (
        <ButtonLink to={cellarPaths.newTransfer()} variant="primary" className={big}>
          Transfer to kegs
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
