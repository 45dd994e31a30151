import { useMemo, useState } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import { transferChecklistItems, type DrawMethod, type TransferView } from '../../../../shared/schemas/transfers.ts';
import { Forbidden } from '@/components/errors/forbidden';
import { Alert } from '@/components/ui/alert';
import { Button, ButtonLink } from '@/components/ui/button';
import { PageLoader } from '@/components/ui/spinner';
import { useKegs } from '@/features/kegs/api/kegs';
import { useRecordTransfer, useTransferCandidates } from '@/features/transfers/api/transfers';
import { Cautions } from '@/components/safety/cautions';
import { BigCheck, BigChoice, BigInput, BigSelect } from '@/components/ui/touch';
import { cellarPaths } from '@/config/cellar-paths';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useUnits } from '@/hooks/use-units';
import { useAppAbility } from '@/lib/ability';
import { ApiProblem, problemMessage } from '@/lib/api-client';
import { fromDisplay, toDisplay } from '@/lib/units';
import { formatAbv, formatDate, formatDateTime } from '@/utils/format';

const n = (v: string) => (v.trim() === '' ? Number.NaN : Number(v));
/** A `datetime-local` value (the page's local time, to the minute). */
const localInput = (d: Date) => new Date(d.getTime() - d.getTimezoneOffset() * 60_000).toISOString().slice(0, 16);
const fromLocalInput = (v: string) => (v ? new Date(v) : null);

/** The transfer checklist: a batch from its fermenter into ready kegs, every step of the trade ticked on a phone. */
const NewTransferRoute = () => {
  useDocumentTitle('Transfer to kegs');
  const ability = useAppAbility();
  const [params] = useSearchParams();
  const units = useUnits();
  const u = units.units;
  const candidates = useTransferCandidates();
  const readyKegs = useKegs({ state: 'ready', pageSize: 100, sort: 'code', order: 'asc' });
  const record = useRecordTransfer();

  const [batchId, setBatchId] = useState(params.get('batchId') ?? '');
  const [kegIds, setKegIds] = useState<string[]>(() => (params.get('kegIds') ?? '').split(',').filter(Boolean));
  const [volume, setVolume] = useState('');
  const [loss, setLoss] = useState('');
  const [perKeg, setPerKeg] = useState<Record<string, string>>({});
  const [split, setSplit] = useState(true);
  const [method, setMethod] = useState<DrawMethod | null>(null);
  const [ticks, setTicks] = useState<Record<string, boolean>>({});
  const [oxygenNote, setOxygenNote] = useState('');
  const [finings, setFinings] = useState<'none' | 'silica finings' | 'gelatin' | 'other'>('none');
  const [finingsOther, setFiningsOther] = useState('');
  const [finingsAmount, setFiningsAmount] = useState('');
  // Opened as the beer starts to flow: the start is then; the end, left blank, is when the transfer is recorded.
  const [startedAt, setStartedAt] = useState(() => localInput(new Date()));
  const [endedAt, setEndedAt] = useState('');
  const [reason, setReason] = useState('');
  const [serverUnstable, setServerUnstable] = useState(false);
  const [oxygen, setOxygen] = useState('');
  const [kegOxygen, setKegOxygen] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<{ transfer: TransferView; warnings: string[] } | null>(null);

  const candidate = candidates.data?.find((c) => c.batchId === batchId) ?? null;
  const drawMethod: DrawMethod = method ?? (candidate?.fermenter && !candidate.fermenter.hasValve ? 'siphon' : 'bottom_valve');
  const items = useMemo(() => transferChecklistItems.filter((i) => !i.method || i.method === drawMethod), [drawMethod]);
  const unticked = items.filter((i) => !ticks[i.key]);
  const kegs = readyKegs.data?.items ?? [];
  const chosen = kegIds.map((id) => kegs.find((k) => k.id === id)).filter((k): k is NonNullable<typeof k> => Boolean(k));
  const finingsKind = finings === 'other' ? finingsOther.trim() : finings;
  const finingsUnit = finings === 'gelatin' ? 'g' : 'mL';
  const unstable = Boolean(candidate && !candidate.gravity.stable) || serverUnstable;
  const start = fromLocalInput(startedAt);
  const end = fromLocalInput(endedAt);
  const timesError = !start
    ? 'Give the start'
    : start.getTime() > Date.now()
      ? 'The start cannot be in the future'
      : end && end <= start
        ? 'The end must be after the start'
        : end && end.getTime() > Date.now()
          ? 'The end cannot be in the future'
          : null;
  const oxygenOk = (v: string) => v.trim() === '' || (n(v) >= 0 && n(v) <= 10_000);

  if (!ability.can('create', 'Transfer')) return <Forbidden what="recording transfers" />;
  if (candidates.isPending || readyKegs.isPending) return <PageLoader />;

  const ready =
    Boolean(candidate?.fermenter) &&
    chosen.length > 0 &&
    n(volume) > 0 &&
    unticked.length === 0 &&
    !timesError &&
    (!unstable || reason.trim().length >= 3) &&
    oxygenOk(oxygen) &&
    chosen.every((k) => oxygenOk(kegOxygen[k.id] ?? '')) &&
    (finings === 'none' || (finingsKind.length > 1 && n(finingsAmount) > 0)) &&
    (split || chosen.every((k) => n(perKeg[k.id] ?? '') > 0));

  const submit = async () => {
    if (!candidate?.fermenter) return;
    setError(null);
    const L = (v: string) => Math.round(fromDisplay.volume(n(v), u) * 100) / 100;
    try {
      const result = await record.mutateAsync({
        batchId: candidate.batchId,
        fromEquipmentId: candidate.fermenter.id,
        toKegIds: chosen.map((k) => k.id),
        volumeLiters: L(volume),
        ...(split ? (loss.trim() ? { lossLiters: L(loss) } : {}) : { kegVolumesLiters: chosen.map((k) => L(perKeg[k.id] ?? '')) }),
        checklist: {
          drawMethod,
          ...Object.fromEntries(items.map((i) => [i.key, Boolean(ticks[i.key])])),
          ...(oxygenNote.trim() ? { oxygenPickupNote: oxygenNote.trim() } : {}),
        },
        finings: finings === 'none' ? null : { kind: finingsKind, amount: n(finingsAmount), unit: finingsUnit },
        startedAt: start!.toISOString(),
        ...(end ? { endedAt: end.toISOString() } : {}),
        ...(unstable && reason.trim() ? { unstableGravityReason: reason.trim() } : {}),
        ...(oxygen.trim() ? { dissolvedOxygenPpb: n(oxygen) } : {}),
        ...(chosen.some((k) => (kegOxygen[k.id] ?? '').trim())
          ? { kegDissolvedOxygenPpb: chosen.map((k) => ((kegOxygen[k.id] ?? '').trim() ? n(kegOxygen[k.id]!) : null)) }
          : {}),
      });
      setDone(result);
      window.scrollTo({ top: 0 });
    } catch (e) {
      // The gravity moved on since the page loaded: ask for the reason the server wants.
      if (e instanceof ApiProblem && e.errors.some((x) => x.path === 'unstableGravityReason')) setServerUnstable(true);
      setError(problemMessage(e));
    }
  };

  const label = 'flex flex-col gap-1 text-sm font-medium';
  if (done) {
    const t = done.transfer;
    return (
      <div className="mx-auto flex w-full max-w-xl flex-col gap-4">
        <h1 className="text-2xl">Transfer recorded</h1>
        <Alert tone="success" title={`${t.batch.name} from ${t.fermenter.code} into ${t.kegs.map((k) => k.code).join(', ')}`}>
          {units.volume(t.packagedLiters)} in kegs, {units.volume(t.lossLiters)} lost{t.abv !== null ? ` · ${formatAbv(t.abv)} on the labels` : ''}.{' '}
          {t.fermenter.code} now needs cleaning.
        </Alert>
        <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
          {t.startedAt && t.endedAt ? (
            <>
              <dt className="text-ink-muted">Drawn</dt>
              <dd>
                {formatDateTime(t.startedAt)} to {formatDateTime(t.endedAt)}
              </dd>
            </>
          ) : null}
          {t.dissolvedOxygenPpb !== null ? (
            <>
              <dt className="text-ink-muted">Dissolved oxygen</dt>
              <dd>{t.dissolvedOxygenPpb} ppb at fill</dd>
            </>
          ) : null}
          {t.unstableGravityReason ? (
            <>
              <dt className="text-ink-muted">Gravity not stable</dt>
              <dd>{t.unstableGravityReason}</dd>
            </>
          ) : null}
        </dl>
        {done.warnings.length ? (
          <Alert tone="info" title="Noted">
            {done.warnings.join(' ')}
          </Alert>
        ) : null}
        <ul className="flex flex-col gap-2">
          {t.kegs.map((k) => (
            <li key={k.kegId} className="flex flex-wrap items-center justify-between gap-2 rounded-md border border-line bg-surface px-3 py-2">
              <span>
                <Link to={cellarPaths.keg(k.kegId)} className="font-semibold">
                  {k.code}
                </Link>{' '}
                · {units.volume(k.volumeLiters)}
                {k.dissolvedOxygenPpb !== null ? ` · DO ${k.dissolvedOxygenPpb} ppb` : ''}
              </span>
              <ButtonLink to={cellarPaths.carbonation(k.kegId)} variant="secondary" className="min-h-12 md:min-h-12 pointer-coarse:min-h-12">
                Plan carbonation
              </ButtonLink>
            </li>
          ))}
        </ul>
        <ButtonLink to={cellarPaths.recordCycle(t.fermenter.id)} variant="primary" className="min-h-12 md:min-h-12 pointer-coarse:min-h-12">
          Clean {t.fermenter.code} now
        </ButtonLink>
      </div>
    );
  }

  return (
    <div className="mx-auto flex w-full max-w-xl flex-col gap-4">
      <nav className="text-sm">
        <Link to={cellarPaths.kegs}>Kegs</Link> <span className="text-ink-faint">/</span> Transfer
      </nav>
      <h1 className="text-2xl">Transfer to kegs</h1>

      <section className="flex flex-col gap-3 rounded-lg border border-line bg-surface p-3" aria-label="Batch and fermenter">
        <label className={label}>
          Batch and its fermenter
          <BigSelect value={batchId} onChange={(e) => (setBatchId(e.target.value), setMethod(null))}>
            <option value="">Pick the batch…</option>
            {candidates.data?.map((c) => (
              <option key={c.batchId} value={c.batchId} disabled={!c.fermenter}>
                {c.fermenter ? `${c.fermenter.code} · ` : ''}
                {c.name} ({c.ownerName}, {c.status})
              </option>
            ))}
          </BigSelect>
        </label>
        {unstable ? (
          <Alert tone="error" title="Gravity not stable yet">
            <p>
              The co-op counts a batch as finished when its gravity holds within ±{(candidate?.gravity.toleranceSg ?? 0.001).toFixed(3)} for{' '}
              {candidate?.gravity.spanDays ?? 3} days
              {candidate ? `; ${candidate.name}'s has held ${candidate.gravity.heldDays} day${candidate.gravity.heldDays === 1 ? '' : 's'}` : ''}. Kegging it
              now may leave it sweet or over-carbonate the kegs.
            </p>
            {candidate && candidate.gravity.readings.length ? (
              <p className="mt-1">Last readings: {candidate.gravity.readings.map((r) => `${r.sg.toFixed(3)} (${formatDate(r.takenAt)})`).join(', ')}</p>
            ) : candidate ? (
              <p className="mt-1">It has no readings.</p>
            ) : null}
          </Alert>
        ) : null}
        {unstable ? (
          <label className={label}>
            Why transfer now? (required)
            <BigInput value={reason} onChange={(e) => setReason(e.target.value)} placeholder="e.g. fermenter needed for the next brew; at target gravity" />
          </label>
        ) : null}
        <div className="grid grid-cols-2 gap-2">
          <label className={label}>
            Started
            <BigInput type="datetime-local" value={startedAt} onChange={(e) => setStartedAt(e.target.value)} />
          </label>
          <label className={label}>
            Ended (blank: now)
            <BigInput type="datetime-local" value={endedAt} onChange={(e) => setEndedAt(e.target.value)} aria-invalid={timesError ? true : undefined} />
          </label>
        </div>
        {timesError ? <p className="text-sm text-danger-strong">{timesError}</p> : null}
        <label className={label}>
          Drawn from the fermenter ({units.labels.volume})
          <BigInput
            type="number"
            inputMode="decimal"
            step="0.1"
            min={0}
            value={volume}
            onChange={(e) => setVolume(e.target.value)}
            placeholder={candidate ? toDisplay.volume(candidate.volumeLiters, u).toFixed(1) : ''}
          />
        </label>
      </section>

      <section className="flex flex-col gap-2 rounded-lg border border-line bg-surface p-3" aria-labelledby="kegs-title">
        <h2 id="kegs-title" className="text-base">
          Into these kegs (ready ones only)
        </h2>
        {kegs.length === 0 ? <Alert tone="info">No keg is ready: record a complete sanitation cycle first.</Alert> : null}
        <div className="grid gap-2 sm:grid-cols-2">
          {kegs.map((k) => (
            <BigCheck
              key={k.id}
              label={k.code}
              description={`${k.capacityLiters ? units.volume(k.capacityLiters) : ''}${k.freshUntil ? ` · ready until ${formatDate(k.freshUntil)}` : ''}`}
              checked={kegIds.includes(k.id)}
              onChange={(e) => setKegIds((ids) => (e.target.checked ? [...ids, k.id] : ids.filter((x) => x !== k.id)))}
            />
          ))}
        </div>
        {chosen.length > 0 ? (
          <div className="flex flex-col gap-2">
            <BigCheck label="Share the volume evenly" checked={split} onChange={(e) => setSplit(e.target.checked)} />
            {split ? (
              <label className={label}>
                Lost: trub, samples, spills ({units.labels.volume})
                <BigInput type="number" inputMode="decimal" step="0.1" min={0} value={loss} onChange={(e) => setLoss(e.target.value)} placeholder="0" />
              </label>
            ) : (
              chosen.map((k) => (
                <label key={k.id} className={label}>
                  In {k.code} ({units.labels.volume})
                  <BigInput
                    type="number"
                    inputMode="decimal"
                    step="0.1"
                    min={0}
                    value={perKeg[k.id] ?? ''}
                    onChange={(e) => setPerKeg((p) => ({ ...p, [k.id]: e.target.value }))}
                  />
                </label>
              ))
            )}
          </div>
        ) : null}
      </section>

      <section className="flex flex-col gap-2 rounded-lg border border-line bg-surface p-3" aria-labelledby="oxygen-title">
        <h2 id="oxygen-title" className="text-base">
          Dissolved oxygen (optional)
        </h2>
        <p className="text-sm text-ink-muted">Where a meter is at hand: ppb, 0 to 10,000.</p>
        <label className={label}>
          At fill (ppb)
          <OxygenInput value={oxygen} valid={oxygenOk(oxygen)} onValue={setOxygen} />
        </label>
        {chosen.map((k) => (
          <label key={k.id} className={label}>
            In {k.code} (ppb)
            <OxygenInput value={kegOxygen[k.id] ?? ''} valid={oxygenOk(kegOxygen[k.id] ?? '')} onValue={(v) => setKegOxygen((o) => ({ ...o, [k.id]: v }))} />
          </label>
        ))}
      </section>

      <section className="flex flex-col gap-2 rounded-lg border border-line bg-surface p-3" aria-labelledby="checklist-title">
        <h2 id="checklist-title" className="text-base">
          Checklist
        </h2>
        <fieldset className="flex flex-col gap-2">
          <legend className="mb-1 text-sm font-medium">Drawing the beer</legend>
          <div className="flex flex-col gap-2 sm:flex-row">
            <BigChoice name="draw" label="Bottom valve" checked={drawMethod === 'bottom_valve'} onChange={() => setMethod('bottom_valve')} />
            <BigChoice name="draw" label="Siphon" checked={drawMethod === 'siphon'} onChange={() => setMethod('siphon')} />
          </div>
        </fieldset>
        {items.map((i) => (
          <BigCheck
            key={i.key}
            label={i.label}
            description={i.help}
            checked={Boolean(ticks[i.key])}
            onChange={(e) => setTicks((t) => ({ ...t, [i.key]: e.target.checked }))}
          />
        ))}
        <label className={label}>
          Oxygen pick-up seen at a fitting (optional)
          <BigInput value={oxygenNote} onChange={(e) => setOxygenNote(e.target.value)} placeholder="e.g. bubbles at the keg barb, tightened" />
        </label>
        <fieldset className="flex flex-col gap-2">
          <legend className="mb-1 text-sm font-medium">Finings</legend>
          <BigSelect value={finings} onChange={(e) => setFinings(e.target.value as typeof finings)} aria-label="Finings">
            <option value="none">None</option>
            <option value="silica finings">Silica finings</option>
            <option value="gelatin">Gelatin</option>
            <option value="other">Other</option>
          </BigSelect>
          {finings === 'other' ? (
            <BigInput aria-label="Which finings" value={finingsOther} onChange={(e) => setFiningsOther(e.target.value)} placeholder="Name the finings" />
          ) : null}
          {finings !== 'none' ? (
            <label className={label}>
              Dose ({finingsUnit})
              <BigInput type="number" inputMode="decimal" step="0.1" min={0} value={finingsAmount} onChange={(e) => setFiningsAmount(e.target.value)} />
            </label>
          ) : null}
        </fieldset>
      </section>

      {error ? (
        <Alert tone="error" title="Not recorded">
          {error}
        </Alert>
      ) : null}
      {unticked.length ? <p className="text-sm text-ink-muted">Tick every step of the checklist to record the transfer ({unticked.length} to go).</p> : null}
      <Button className="min-h-12 md:min-h-12 pointer-coarse:min-h-12 w-full text-base" onClick={submit} pending={record.isPending} disabled={!ready}>
        Record the transfer
      </Button>
      <Cautions kind="pressure" />
    </div>
  );
};

/** Dissolved oxygen in ppb, 0 to 10,000, as a meter shows it. */
const OxygenInput = ({ value, valid, onValue }: { value: string; valid: boolean; onValue: (v: string) => void }) => (
  <BigInput
    type="number"
    inputMode="decimal"
    step="1"
    min={0}
    max={10000}
    value={value}
    onChange={(e) => onValue(e.target.value)}
    aria-invalid={valid ? undefined : true}
  />
);

export default NewTransferRoute;
