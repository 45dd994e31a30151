import { useMemo, useState } from 'react';
import { Link, useNavigate, useParams } from 'react-router-dom';
import { lineMaterials, lineResistanceKpaPerM, lineTubingTable, type LineMaterial, type LineTubing } from '../../../../shared/brewing/index.ts';
import {
  carbonationMethodLabels,
  checkLine,
  planCarbonation,
  PlanError,
  tubingForInsideDiameter,
  tubingLabels,
  type CarbonationMethod,
} from '../../../../shared/cellar/carbonation-planner.ts';
import { defaultCarbonationSettings, type CarbonationSettings } from '../../../../shared/schemas/cellar-settings.ts';
import { Forbidden } from '@/components/errors/forbidden';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { PageLoader } from '@/components/ui/spinner';
import { useCreatePlan } from '@/features/carbonation/api/carbonation';
import { useKeg, useTapBoard } from '@/features/kegs/api/kegs';
import { Cautions } from '@/components/safety/cautions';
import { useEquipment } from '@/features/equipment/api/get-equipment';
import { inspectionKindLabels } from '../../../../shared/schemas/inspections.ts';
import { localNow } from '@/features/sanitation/step-draft';
import { BigAmount, BigChoice, BigInput, BigSelect } from '@/components/ui/touch';
import { cellarPaths } from '@/config/cellar-paths';
import { useSetting } from '@/features/settings/api/setting';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useUnits } from '@/hooks/use-units';
import { useAppAbility } from '@/lib/ability';
import { problemMessage } from '@/lib/api-client';
import { formatKPa, fromDisplay, toDisplay } from '@/lib/units';
import { formatDateTime } from '@/utils/format';

const FT = 0.3048;
const n = (v: string) => (v.trim() === '' ? Number.NaN : Number(v));
const methodChoices: readonly (readonly [CarbonationMethod, string])[] = [
  ['set_and_hold', 'About two weeks'],
  ['fast_start', 'About three days, then serving pressure'],
];

/** The carbonation planner for one keg: target volumes → regulator pressure, ready date, fast-start reminder, line balance. */
const CarbonationPlannerRoute = () => {
  const { kegId = '' } = useParams();
  const navigate = useNavigate();
  const ability = useAppAbility();
  const keg = useKeg(kegId);
  const item = useEquipment(kegId);
  const board = useTapBoard();
  const setting = useSetting<CarbonationSettings>('carbonation');
  useDocumentTitle(keg.data ? `Carbonation · ${keg.data.keg.code}` : 'Carbonation');
  if (!ability.can('create', 'CarbonationPlan')) return <Forbidden what="carbonation plans" />;
  if (keg.isPending || setting.isPending) return <PageLoader />;
  if (keg.isError) return <Alert tone="error">{problemMessage(keg.error)}</Alert>;
  return (
    <PlannerForm
      kegId={kegId}
      kegCode={keg.data.keg.code}
      holds={keg.data.keg.contents?.batchName ?? null}
      currentTapId={keg.data.keg.tap?.id ?? ''}
      ratedKpa={typeof item.data?.equipment.attributes.ratedPressureKpa === 'number' ? item.data.equipment.attributes.ratedPressureKpa : null}
      blocked={(item.data?.inspectionsDue ?? []).filter((d) => d.failed || d.overdue).map((d) => inspectionKindLabels[d.kind])}
      taps={board.data?.taps ?? []}
      settings={setting.data?.value ?? defaultCarbonationSettings}
      onSaved={() => navigate(cellarPaths.keg(kegId))}
    />
  );
};

interface PlannerFormProps {
  kegId: string;
  kegCode: string;
  holds: string | null;
  currentTapId: string;
  /** The keg's rated working pressure, kPa gauge (null when not recorded). */
  ratedKpa?: number | null;
  /** Inspections failed or past due: no plan may be saved. */
  blocked?: string[];
  taps: {
    id: string;
    code: string;
    position: string | null;
    lineLengthM: number | null;
    lineInsideDiameterMm: number | null;
    lineMaterial?: string | null;
    lineResistanceKpaPerM?: number | null;
    riseM: number | null;
    coldRoomTempC: number | null;
  }[];
  settings: CarbonationSettings;
  onSaved: () => void;
}

const PSI_KPA = 6.894757293168361;

/** A tap's line as recorded: its tubing kind (vinyl unless said) and its own resistance or the type's default. */
function lineOfTap(tap: PlannerFormProps['taps'][number] | undefined): {
  tubing: LineTubing | null;
  material: LineMaterial | null;
  resistanceKpaPerM: number | null;
} {
  if (!tap || tap.lineInsideDiameterMm === null) return { tubing: null, material: null, resistanceKpaPerM: null };
  const material = (lineMaterials as readonly (string | null | undefined)[]).includes(tap.lineMaterial) ? (tap.lineMaterial as LineMaterial) : null;
  const tubing = tubingForInsideDiameter(tap.lineInsideDiameterMm, material ?? 'vinyl');
  return { tubing, material, resistanceKpaPerM: tap.lineResistanceKpaPerM ?? (tubing ? lineResistanceKpaPerM[tubing] : null) };
}

const resistanceToDisplay = (kPaPerM: number, u: 'metric' | 'us') => (u === 'us' ? ((kPaPerM * FT) / PSI_KPA).toFixed(3) : kPaPerM.toFixed(1));

const PlannerForm = ({ kegId, kegCode, holds, currentTapId, ratedKpa = null, blocked = [], taps, settings, onSaved }: PlannerFormProps) => {
  const units = useUnits();
  const u = units.units;
  const create = useCreatePlan();
  const [error, setError] = useState<string | null>(null);
  const [family, setFamily] = useState(settings.stylePresets[0]?.family ?? '');
  const [volumes, setVolumes] = useState(String(settings.stylePresets[0]?.volumes ?? 2.4));
  const [temp, setTemp] = useState(toDisplay.temperature(settings.coldRoomTempC, u).toFixed(1));
  const [altitude, setAltitude] = useState(String(Math.round(u === 'us' ? settings.altitudeM / FT : settings.altitudeM)));
  const [method, setMethod] = useState<CarbonationMethod>('set_and_hold');
  const [fastPressure, setFastPressure] = useState(toDisplay.pressure(settings.fastStartPressureKpa, u).toFixed(u === 'us' ? 0 : 2));
  const [fastHours, setFastHours] = useState(String(settings.fastStartHours));
  const [holdDays, setHoldDays] = useState(String(settings.holdDays));
  const [startedAt, setStartedAt] = useState(localNow());
  const [tapId, setTapId] = useState(currentTapId);
  const tap = taps.find((t) => t.id === tapId);
  const tapLine = lineOfTap(tap);
  const tapResistance = tapLine.resistanceKpaPerM !== null ? resistanceToDisplay(tapLine.resistanceKpaPerM, u) : '';
  // null follows the tap's record (which may arrive after the form); a choice on screen overrides it.
  const [lineTypeChoice, setLineTypeChoice] = useState<LineTubing | '' | null>(null);
  const [resistanceChoice, setResistanceChoice] = useState<string | null>(null);
  const lineType = lineTypeChoice ?? tapLine.tubing ?? '';
  const resistance = resistanceChoice ?? tapResistance;
  const pickTap = (id: string) => {
    setTapId(id);
    setLineTypeChoice(null);
    setResistanceChoice(null);
  };
  const pickLineType = (t: LineTubing | '') => {
    setLineTypeChoice(t);
    if (t) setResistanceChoice(resistanceToDisplay(lineResistanceKpaPerM[t], u));
  };
  const resistanceKpaPerM = resistance.trim() === '' ? undefined : u === 'us' ? (n(resistance) * PSI_KPA) / FT : n(resistance);
  const lineMaterial: LineMaterial | undefined = lineType ? lineTubingTable.find((r) => r.tubing === lineType)?.material : (tapLine.material ?? undefined);

  const inputs = {
    targetVolumes: n(volumes),
    temperatureC: fromDisplay.temperature(n(temp), u),
    altitudeM: u === 'us' ? n(altitude) * FT : n(altitude),
    fastStartPressureKpa: fromDisplay.pressure(n(fastPressure), u),
    fastStartHours: n(fastHours),
    holdDays: n(holdDays),
  };
  const result = useMemo(() => {
    try {
      const plan = planCarbonation({
        ...inputs,
        method,
        startedAt: new Date(startedAt),
        settleDays: settings.settleDays,
        maxPressureKpa: settings.maxPlanPressureKpa,
        fastStartPressureKpa: method === 'fast_start' ? inputs.fastStartPressureKpa : undefined,
        fastStartHours: method === 'fast_start' ? inputs.fastStartHours : undefined,
      });
      const line =
        tap && tap.lineLengthM !== null && tap.lineInsideDiameterMm !== null
          ? checkLine({
              servingPressureKpa: plan.servingPressureKpa,
              lengthM: tap.lineLengthM,
              insideDiameterMm: tap.lineInsideDiameterMm,
              riseM: tap.riseM ?? 0,
              fixedKpa: settings.lineFixedKpa,
              material: lineMaterial,
              resistanceKpaPerM: resistanceKpaPerM !== undefined && Number.isFinite(resistanceKpaPerM) && resistanceKpaPerM > 0 ? resistanceKpaPerM : undefined,
            })
          : null;
      return { plan, line, problem: null as string | null };
    } catch (e) {
      return { plan: null, line: null, problem: e instanceof PlanError || e instanceof RangeError ? e.message : String(e) };
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps -- the unit helpers are rebuilt each render; `u` stands for them
  }, [volumes, temp, altitude, method, fastPressure, fastHours, holdDays, startedAt, tapId, taps, lineType, resistance, u]);
  // The line as checked on screen, sent with the tap when it differs from the tap's record.
  const lineChanged =
    tap && tap.lineLengthM !== null && tap.lineInsideDiameterMm !== null && result.line && (lineType !== (tapLine.tubing ?? '') || resistance !== tapResistance)
      ? {
          lengthM: tap.lineLengthM,
          insideDiameterMm: tap.lineInsideDiameterMm,
          riseM: tap.riseM ?? 0,
          ...(lineMaterial ? { material: lineMaterial } : {}),
          ...(result.line.resistanceKpaPerM !== null ? { resistanceKpaPerM: Math.round(result.line.resistanceKpaPerM * 100) / 100 } : {}),
        }
      : null;

  const save = async () => {
    setError(null);
    try {
      await create.mutateAsync({
        kegId,
        targetVolumes: inputs.targetVolumes,
        styleFamily: family,
        temperatureC: Math.round(inputs.temperatureC * 100) / 100,
        altitudeM: Math.round(inputs.altitudeM),
        method,
        startedAt: new Date(startedAt).toISOString(),
        ...(method === 'fast_start'
          ? { fastStartPressureKpa: Math.round(inputs.fastStartPressureKpa * 10) / 10, fastStartHours: inputs.fastStartHours }
          : { holdDays: inputs.holdDays }),
        ...(tapId ? { tapId } : {}),
        ...(lineChanged ? { line: lineChanged } : {}),
      });
      onSaved();
    } catch (e) {
      setError(problemMessage(e));
    }
  };

  const label = 'flex flex-col gap-1 text-sm font-medium';
  return (
    <div className="mx-auto flex w-full max-w-2xl flex-col gap-4">
      <nav className="text-sm">
        <Link to={cellarPaths.kegs}>Kegs</Link> <span className="text-ink-faint">/</span> <Link to={cellarPaths.keg(kegId)}>{kegCode}</Link>{' '}
        <span className="text-ink-faint">/</span> Carbonation
      </nav>
      <header>
        <h1 className="text-2xl">Carbonate {kegCode}</h1>
        {holds ? <p className="mt-1 text-ink-muted">{holds}</p> : null}
        <p className="mt-1 text-sm" data-testid="keg-rating">
          Keg rated working pressure: <strong>{ratedKpa !== null ? `${units.pressure(ratedKpa)} (${formatKPa(ratedKpa)})` : 'not recorded'}</strong>. Never set
          the regulator above it; the keg’s relief valve must work. Local codes come first.
        </p>
      </header>
      {blocked.length ? (
        <Alert tone="error" title={`${kegCode} may not be carbonated`}>
          {blocked.join(', ')} failed or past due: record a passing inspection on the keg’s page first.
        </Alert>
      ) : null}

      <section className="grid gap-3 rounded-lg border border-line bg-surface p-4 sm:grid-cols-2" aria-label="Target">
        <label className={label}>
          Style family
          <BigSelect
            value={family}
            onChange={(e) => {
              setFamily(e.target.value);
              const p = settings.stylePresets.find((s) => s.family === e.target.value);
              if (p) setVolumes(String(p.volumes));
            }}
          >
            {settings.stylePresets.map((p) => (
              <option key={p.family} value={p.family}>
                {p.family} ({p.volumes} vol)
              </option>
            ))}
          </BigSelect>
        </label>
        <label className={label}>
          Target CO2 (volumes)
          <BigInput type="number" inputMode="decimal" step="0.1" min={1} max={4.5} value={volumes} onChange={(e) => setVolumes(e.target.value)} />
        </label>
        <label className={label}>
          Cold-room temperature ({units.labels.temperature})
          <BigInput type="number" inputMode="decimal" step="0.5" value={temp} onChange={(e) => setTemp(e.target.value)} />
        </label>
        <label className={label}>
          Altitude ({u === 'us' ? 'ft' : 'm'})
          <BigInput type="number" inputMode="numeric" step="10" value={altitude} onChange={(e) => setAltitude(e.target.value)} />
        </label>
        <fieldset className="flex flex-col gap-2 sm:col-span-2">
          <legend className="mb-1 text-sm font-medium">Method</legend>
          <div className="flex flex-col gap-2 sm:flex-row">
            {methodChoices.map(([value, description]) => (
              <BigChoice
                key={value}
                name="method"
                label={carbonationMethodLabels[value]}
                description={description}
                checked={method === value}
                onChange={() => setMethod(value)}
              />
            ))}
          </div>
        </fieldset>
        {method === 'fast_start' ? (
          <>
            <label className={label}>
              Fast-start pressure ({units.labels.pressure})
              <BigInput type="number" inputMode="decimal" step="any" value={fastPressure} onChange={(e) => setFastPressure(e.target.value)} />
            </label>
            <label className={label}>
              Hours at it
              <BigInput type="number" inputMode="numeric" step="1" min={1} max={120} value={fastHours} onChange={(e) => setFastHours(e.target.value)} />
            </label>
          </>
        ) : (
          <label className={label}>
            Days at serving pressure
            <BigInput type="number" inputMode="numeric" step="1" min={1} max={30} value={holdDays} onChange={(e) => setHoldDays(e.target.value)} />
          </label>
        )}
        <label className={label}>
          Start
          <BigInput type="datetime-local" value={startedAt} onChange={(e) => setStartedAt(e.target.value)} />
        </label>
        <label className={`${label} sm:col-span-2`}>
          Check the line of
          <BigSelect value={tapId} onChange={(e) => pickTap(e.target.value)}>
            <option value="">No tap</option>
            {taps.map((t) => (
              <option key={t.id} value={t.id}>
                {t.code}
                {t.lineLengthM !== null ? ` · ${t.lineLengthM} m × ${t.lineInsideDiameterMm} mm, rise ${t.riseM ?? 0} m` : ''}
              </option>
            ))}
          </BigSelect>
        </label>
        {tap && tap.lineLengthM !== null ? (
          <>
            <label className={label}>
              Line type
              <BigSelect value={lineType} onChange={(e) => pickLineType(e.target.value as LineTubing | '')}>
                <option value="">Not in the table</option>
                {lineTubingTable.map((r) => (
                  <option key={r.tubing} value={r.tubing}>
                    {tubingLabels[r.tubing]}
                  </option>
                ))}
              </BigSelect>
            </label>
            <label className={label}>
              Line resistance ({u === 'us' ? 'psi/ft' : 'kPa/m'})
              <BigAmount value={resistance} onChange={(e) => setResistanceChoice(e.target.value)} />
              <span className="text-xs font-normal text-ink-muted">
                {lineType ? `Default for this line: ${lineDefaultBasis(lineTubingTable.find((r) => r.tubing === lineType)?.defaultBasis)}. ` : ''}
                Makers' figures differ; change it to what you measure.
              </span>
            </label>
          </>
        ) : null}
      </section>

      <section aria-live="polite" className="flex flex-col gap-2 rounded-lg border border-copper/40 bg-copper-soft/40 p-4" aria-label="Plan">
        {result.plan ? (
          <>
            <p className="text-sm text-ink-muted">Regulator at serving pressure</p>
            <p className="text-3xl font-semibold" data-testid="serving-pressure">
              {units.pressure(result.plan.servingPressureKpa)}{' '}
              <span className="text-base font-normal text-ink-muted">({formatKPa(result.plan.servingPressureKpa)} gauge)</span>
            </p>
            {result.plan.lowerPressureAt ? (
              <p>
                Start at {units.pressure(inputs.fastStartPressureKpa)}, lower to serving pressure at{' '}
                <strong>{formatDateTime(result.plan.lowerPressureAt)}</strong> (the brewer on duty gets a reminder); by then it is roughly 80 % of the way.
              </p>
            ) : null}
            <p>
              Ready about <strong>{formatDateTime(result.plan.readyAt)}</strong>.
            </p>
            {result.plan.warnings.map((w) => (
              <p key={w} className="text-sm text-due-strong">
                {w}
              </p>
            ))}
            {result.line ? <p className={`text-sm ${result.line.suits ? 'text-hop-strong' : 'text-due-strong'}`}>{result.line.verdict}</p> : null}
            {ratedKpa !== null && Math.max(result.plan.servingPressureKpa, method === 'fast_start' ? inputs.fastStartPressureKpa : 0) > ratedKpa ? (
              <p className="text-sm font-semibold text-danger">
                Above the keg’s rated working pressure of {units.pressure(ratedKpa)}: the plan will be refused.
              </p>
            ) : null}
          </>
        ) : (
          <p className="text-due-strong">{result.problem}</p>
        )}
      </section>
      {error ? (
        <Alert tone="error" title="Not saved">
          {error}
        </Alert>
      ) : null}
      <Button className="min-h-12 md:min-h-12 pointer-coarse:min-h-12 w-full text-base" onClick={save} pending={create.isPending} disabled={!result.plan}>
        Save the plan
      </Button>
      <Cautions kind="carbonation" />
    </div>
  );
};

/** What a line's default rests on, in words for the screen (the table's source ids are for the code). */
const lineDefaultBasis = (basis: string | undefined) =>
  !basis
    ? 'a published figure'
    : basis.startsWith('common practice')
      ? basis
      : `a published figure${basis.includes('low confidence') ? ' (sources differ)' : ''}`;

export default CarbonationPlannerRoute;
