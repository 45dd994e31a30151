import { useState } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import type { SanitationSettings } from '../../../../shared/schemas/cellar-settings.ts';
import { vesselStateLabels } from '../../../../shared/schemas/equipment.ts';
import type { SanitationCycleView } from '../../../../shared/schemas/sanitation.ts';
import { Forbidden } from '@/components/errors/forbidden';
import { Alert } from '@/components/ui/alert';
import { Badge } from '@/components/ui/badge';
import { Button, ButtonLink } from '@/components/ui/button';
import { PageLoader } from '@/components/ui/spinner';
import { useCycles, useVesselStatus } from '@/features/sanitation/api/sanitation';
import { SanitationChecklist } from '@/features/sanitation/components/sanitation-checklist';
import { BigInput } from '@/components/ui/touch';
import { cellarPaths } from '@/config/cellar-paths';
import { useEquipment } from '@/features/equipment/api/get-equipment';
import { StateBadge } from '@/features/equipment/components/state-badge';
import { useSetting } from '@/features/settings/api/setting';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useAppAbility } from '@/lib/ability';
import { problemMessage } from '@/lib/api-client';
import { formatDateTime } from '@/utils/format';

/** Which vessel: reached from its QR label's page with ?equipmentId=, or picked here by code. */
const VesselPicker = ({ onPick }: { onPick: (id: string) => void }) => {
  const [q, setQ] = useState('');
  const list = useVesselStatus({ q: q || undefined, sort: 'code', order: 'asc', pageSize: 20 });
  return (
    <div className="flex flex-col gap-3">
      <label className="flex flex-col gap-1 text-sm font-medium">
        Vessel code
        <BigInput type="search" value={q} placeholder="e.g. K-012 or F-03" onChange={(e) => setQ(e.target.value)} autoFocus />
      </label>
      <ul className="flex flex-col gap-2" aria-label="Vessels">
        {list.data?.items
          .filter((v) => v.state !== 'holding' && v.state !== 'out_of_service')
          .map((v) => (
            <li key={v.id}>
              <button
                type="button"
                onClick={() => onPick(v.id)}
                className="flex min-h-12 md:min-h-12 pointer-coarse:min-h-12 w-full items-center justify-between gap-3 rounded-md border border-line-strong bg-surface px-3 py-2 text-left hover:border-copper"
              >
                <span>
                  <span className="font-semibold">{v.code}</span> <span className="text-sm text-ink-muted">{v.name}</span>
                </span>
                <StateBadge state={v.state} />
              </button>
            </li>
          ))}
      </ul>
    </div>
  );
};

const outcomeTone = { ready: 'ready', cleaned: 'muted', needs_cleaning: 'due' } as const;

/** Record a cycle: the phone checklist screen. */
const RecordCycleRoute = () => {
  const [params, setParams] = useSearchParams();
  const equipmentId = params.get('equipmentId') ?? '';
  const ability = useAppAbility();
  const vessel = useEquipment(equipmentId);
  const latest = useCycles({ equipmentId, pageSize: 1, sort: 'completedAt', order: 'desc' }, Boolean(equipmentId));
  const settings = useSetting<SanitationSettings>('sanitation');
  const [saved, setSaved] = useState<{ cycle: SanitationCycleView; equipment: { id: string; code: string; state: string } } | null>(null);
  const [round, setRound] = useState(0);
  useDocumentTitle(vessel.data ? `Clean ${vessel.data.equipment.code}` : 'Record a cycle');

  if (!ability.can('create', 'SanitationCycle')) return <Forbidden what="recording sanitation cycles" />;
  const header = (
    <nav className="text-sm">
      <Link to={cellarPaths.sanitation}>Sanitation</Link> <span className="text-ink-faint">/</span> Record a cycle
    </nav>
  );
  if (!equipmentId) {
    return (
      <div className="mx-auto flex w-full max-w-xl flex-col gap-4">
        {header}
        <h1 className="text-2xl">Record a cycle</h1>
        <VesselPicker onPick={(id) => setParams({ equipmentId: id })} />
      </div>
    );
  }
  if (vessel.isPending || settings.isPending || latest.isPending) return <PageLoader />;
  if (vessel.isError)
    return (
      <Alert tone="error" title="This vessel could not be shown">
        {problemMessage(vessel.error)}
      </Alert>
    );
  const item = vessel.data.equipment;
  const last = latest.data?.items[0];
  const openCycle = last && !last.complete && last.outcome === item.state ? last : null;

  return (
    <div className="mx-auto flex w-full max-w-xl flex-col gap-4">
      {header}
      <header>
        <h1 className="flex flex-wrap items-center gap-3 text-2xl">
          Clean {item.code} <StateBadge state={item.state} />
        </h1>
        <p className="mt-1 text-ink-muted">{item.name}</p>
      </header>
      {saved ? (
        <section className="flex flex-col gap-3 rounded-lg border border-line bg-surface p-4" aria-live="polite">
          <h2 className="flex flex-wrap items-center gap-2 text-lg">
            Cycle saved: {saved.equipment.code} is now <Badge tone={outcomeTone[saved.cycle.outcome]}>{vesselStateLabels[saved.cycle.outcome]}</Badge>
          </h2>
          {saved.cycle.complete ? (
            <>
              <p className="text-sm text-ink-muted">Ready until {formatDateTime(saved.cycle.freshUntil)}.</p>
              {saved.cycle.issues.length ? (
                <ul className="list-disc pl-5 text-sm text-due-strong" aria-label="Recorded exceptions">
                  {saved.cycle.issues.map((i) => (
                    <li key={`${i.code}-${i.step}`}>{i.message}</li>
                  ))}
                </ul>
              ) : null}
            </>
          ) : (
            <ul className="list-disc pl-5 text-sm text-due-strong">
              {saved.cycle.issues.map((i) => (
                <li key={`${i.code}-${i.step}`}>{i.message}</li>
              ))}
            </ul>
          )}
          <div className="flex flex-col gap-2 sm:flex-row">
            {saved.cycle.complete && item.kind === 'keg' && ability.can('create', 'Transfer') ? (
              <ButtonLink to={cellarPaths.newTransfer({ kegIds: [item.id] })} variant="primary" className="min-h-12 md:min-h-12 pointer-coarse:min-h-12">
                Transfer beer into {item.code}
              </ButtonLink>
            ) : null}
            <Button variant="secondary" className="min-h-12 md:min-h-12 pointer-coarse:min-h-12" onClick={() => (setSaved(null), setRound((r) => r + 1))}>
              Record another cycle here
            </Button>
            <ButtonLink to={cellarPaths.sanitation} variant="ghost" className="min-h-12 md:min-h-12 pointer-coarse:min-h-12">
              Back to Sanitation
            </ButtonLink>
          </div>
        </section>
      ) : item.kind !== 'keg' && item.kind !== 'fermenter' ? (
        <Alert tone="info">Only fermenters and kegs have sanitation cycles.</Alert>
      ) : item.state === 'holding' ? (
        <Alert tone="info" title={`${item.code} holds beer`}>
          Empty it before cleaning it.
        </Alert>
      ) : item.state === 'out_of_service' ? (
        <Alert tone="info">{item.code} is out of service.</Alert>
      ) : (
        <SanitationChecklist key={`${item.id}-${round}`} vessel={item} settings={settings.data?.value} openCycle={openCycle} onSaved={setSaved} />
      )}
    </div>
  );
};

export default RecordCycleRoute;
