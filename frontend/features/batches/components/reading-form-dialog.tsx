import { useEffect, useMemo, useState } from 'react';
import { convertGravity } from '../../../../shared/brewing/index.ts';
import {
  brixMethodLabels,
  brixMethods,
  checkAgainstOriginal,
  defaultBrixMethod,
  gravityEntryRanges,
  normaliseGravity,
  type BrixMethod,
} from '../../../../shared/brewing/readings.ts';
import { createReadingSchema, gravityUnitLabels, gravityUnits, type BatchDetail, type GravityUnit } from '../../../../shared/schemas/batches.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Dialog, DialogActions } from '@/components/ui/dialog';
import { Field } from '@/components/ui/field';
import { Checkbox, Input, Select } from '@/components/ui/input';
import { useNotice } from '@/components/ui/notice';
import { useCreateReading } from '@/features/batches/api/readings';
import { formatSg } from '@/features/batches/components/gravity-format';
import { useUnits } from '@/hooks/use-units';
import { isApiProblem, problemMessage } from '@/lib/api-client';
import { fromDisplay } from '@/lib/units';

/** Now, as a datetime-local value in the browser's time zone. */
function localNow(): string {
  const d = new Date();
  d.setSeconds(0, 0);
  return new Date(d.getTime() - d.getTimezoneOffset() * 60_000).toISOString().slice(0, 16);
}

const parseNumber = (s: string): number | null => {
  const t = s.trim().replace(',', '.');
  if (t === '') return null;
  const n = Number(t);
  return Number.isFinite(n) ? n : Number.NaN;
};

export interface ReadingFormDialogProps {
  open: boolean;
  onClose: () => void;
  batch: BatchDetail;
}

const ReadingForm = ({ batch, onClose, onBusy }: Omit<ReadingFormDialogProps, 'open'> & { onBusy: (b: boolean) => void }) => {
  const units = useUnits();
  const create = useCreateReading(batch.id);
  const notice = useNotice();
  useEffect(() => onBusy(create.isPending), [create.isPending, onBusy]);
  const [takenAt, setTakenAt] = useState(localNow);
  const [gravity, setGravity] = useState('');
  const [unit, setUnit] = useState<GravityUnit>('sg');
  const [temperature, setTemperature] = useState('');
  const [correct, setCorrect] = useState(true);
  const [note, setNote] = useState('');
  const [chosenMethod, setChosenMethod] = useState<BrixMethod | null>(null);
  const [confirm, setConfirm] = useState(false);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [formError, setFormError] = useState<string | null>(null);

  const value = parseNumber(gravity);
  const tempDisplay = parseNumber(temperature);
  const tempC = tempDisplay === null || Number.isNaN(tempDisplay) ? null : fromDisplay.temperature(tempDisplay, units.units);
  const time = Date.parse(takenAt);
  // Brix after the first reading is read through alcohol, with the batch's original gravity.
  const afterFirst = batch.firstReadingAt !== null && Number.isFinite(time) && time > Date.parse(batch.firstReadingAt);
  const originalBrix = useMemo(() => {
    if (!afterFirst || batch.og === null || batch.og < 1 || batch.og > 1.17874) return null;
    return convertGravity(batch.og, 'sg', 'brix') * batch.corrections.wortCorrectionFactor;
  }, [afterFirst, batch.og, batch.corrections.wortCorrectionFactor]);
  // Wort for a batch with no OG yet, alcohol-corrected after; the user may choose otherwise.
  const method = chosenMethod ?? defaultBrixMethod(originalBrix);

  const preview = useMemo(() => {
    if (value === null || Number.isNaN(value)) return null;
    try {
      return {
        ok: normaliseGravity(value, unit, tempC, {
          correctTemperature: correct,
          calibrationC: batch.corrections.hydrometerCalibrationC,
          wortCorrectionFactor: batch.corrections.wortCorrectionFactor,
          originalBrix,
          method: unit === 'brix' ? method : null,
        }),
      };
    } catch (e) {
      return { error: e instanceof Error ? e.message : String(e) };
    }
  }, [value, unit, tempC, correct, originalBrix, method, batch.corrections]);
  // A later reading against the batch's OG: above it is refused, beyond the plausible attenuation needs a confirmation.
  const check = preview && 'ok' in preview && preview.ok && afterFirst && batch.og !== null ? checkAgainstOriginal(preview.ok.sg, batch.og, confirm) : null;
  const needsConfirm =
    preview && 'ok' in preview && preview.ok && afterFirst && batch.og !== null ? checkAgainstOriginal(preview.ok.sg, batch.og).confirmable : false;

  const submit = (event: React.FormEvent) => {
    event.preventDefault();
    setFormError(null);
    const local = new Date(takenAt);
    const parsed = createReadingSchema.safeParse({
      takenAt: Number.isNaN(local.getTime()) ? takenAt : local.toISOString(),
      gravity: value === null ? undefined : value,
      unit,
      temperatureC: tempC === null ? null : Math.round(tempC * 100) / 100,
      correctTemperature: correct,
      note,
      method: unit === 'brix' ? method : null,
      confirm: needsConfirm && confirm,
    });
    if (!parsed.success) {
      const next: Record<string, string> = {};
      for (const issue of parsed.error.issues) next[String(issue.path[0] ?? '')] ??= issue.message;
      setErrors(next);
      return;
    }
    if (preview && 'error' in preview) {
      setErrors({ gravity: preview.error ?? 'Check the gravity' });
      return;
    }
    if (check?.refusal) {
      setErrors({ gravity: check.refusal });
      return;
    }
    setErrors({});
    create.mutate(parsed.data, {
      onSuccess: (reading) => {
        // The server moves a planned batch to Fermenting with its first reading: say so.
        notice.show(
          batch.status === 'planned'
            ? {
                title: `${batch.name} is now Fermenting`,
                text: `Reading of ${formatSg(reading.gravitySg)} saved. A planned batch starts fermenting with its first reading.`,
              }
            : { text: `Reading of ${formatSg(reading.gravitySg)} saved.` },
        );
        onClose();
      },
      onError: (error) => {
        if (isApiProblem(error) && error.errors.length) {
          const next: Record<string, string> = {};
          for (const e of error.errors) next[e.path] ??= e.message;
          setErrors(next);
          if (!Object.keys(next).some((k) => ['takenAt', 'gravity', 'unit', 'temperatureC'].includes(k))) setFormError(problemMessage(error));
        } else setFormError(problemMessage(error));
      },
    });
  };

  const range = gravityEntryRanges[unit];
  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-4">
      {formError ? <Alert tone="error">{formError}</Alert> : null}
      <Field label="Taken at" error={errors.takenAt}>
        {({ invalid, ...c }) => <Input {...c} invalid={invalid} type="datetime-local" value={takenAt} onChange={(e) => setTakenAt(e.target.value)} />}
      </Field>
      <div className="grid gap-4 sm:grid-cols-[1fr_9rem]">
        <Field label="Gravity" hint={`${range.label}: ${range.min} to ${range.max}`} error={errors.gravity}>
          {({ invalid, ...c }) => (
            <Input
              {...c}
              invalid={invalid}
              inputMode="decimal"
              autoFocus
              value={gravity}
              onChange={(e) => setGravity(e.target.value)}
              placeholder={unit === 'sg' ? '1.048' : '12.0'}
            />
          )}
        </Field>
        <Field label="Scale" error={errors.unit}>
          {({ invalid, ...c }) => (
            <Select {...c} invalid={invalid} value={unit} onChange={(e) => setUnit(e.target.value as GravityUnit)}>
              {gravityUnits.map((u) => (
                <option key={u} value={u}>
                  {u === 'sg' ? 'SG (hydrometer)' : u === 'plato' ? '°Plato' : 'Brix (refractometer)'}
                </option>
              ))}
            </Select>
          )}
        </Field>
      </div>
      <Field label={`Sample temperature (${units.labels.temperature})`} hint="Optional." error={errors.temperatureC}>
        {({ invalid, ...c }) => <Input {...c} invalid={invalid} inputMode="decimal" value={temperature} onChange={(e) => setTemperature(e.target.value)} />}
      </Field>
      {unit === 'brix' ? (
        <Field
          label="Refractometer sample"
          hint="Wort has no alcohol yet; a fermenting or finished sample is corrected for alcohol with the batch’s original gravity."
          error={errors.method}
        >
          {({ invalid, ...c }) => (
            <Select {...c} invalid={invalid} value={method} onChange={(e) => setChosenMethod(e.target.value as BrixMethod)}>
              {brixMethods.map((m) => (
                <option key={m} value={m}>
                  {brixMethodLabels[m]}
                </option>
              ))}
            </Select>
          )}
        </Field>
      ) : null}
      {unit !== 'brix' ? (
        <Checkbox
          label={`Correct to the hydrometer’s calibration temperature (${units.temperature(batch.corrections.hydrometerCalibrationC, { digits: 0 })})`}
          checked={correct}
          onChange={(e) => setCorrect(e.target.checked)}
        />
      ) : null}
      <div aria-live="polite" className="rounded-md border border-line bg-ground px-3 py-2 text-sm" data-testid="correction-preview">
        {!preview ? (
          <span className="text-ink-muted">Enter a gravity to see what is stored.</span>
        ) : 'error' in preview ? (
          <span className="text-danger">{preview.error}</span>
        ) : check?.refusal ? (
          <span className="text-danger">{check.refusal}</span>
        ) : (
          <span>
            Stored as <strong className="tabular-nums">{formatSg(preview.ok.sg, 4)}</strong> SG
            {preview.ok.correction === 'hydrometer-temperature' && tempC !== null
              ? ` — read ${formatSg(preview.ok.rawSg, 4)} at ${units.temperature(tempC)}, corrected to ${units.temperature(batch.corrections.hydrometerCalibrationC, { digits: 0 })} (${preview.ok.sg - (preview.ok.rawSg ?? preview.ok.sg) >= 0 ? '+' : ''}${((preview.ok.sg - (preview.ok.rawSg ?? preview.ok.sg)) * 1000).toFixed(1)} points)`
              : preview.ok.correction === 'refractometer-alcohol'
                ? ` — refractometer reading through alcohol, corrected from the original ${originalBrix?.toFixed(1)} °Bx (alcohol correction for finished beer, wort factor ${batch.corrections.wortCorrectionFactor})`
                : preview.ok.correction === 'refractometer-wort-factor'
                  ? ` — wort reading divided by the wort correction factor ${batch.corrections.wortCorrectionFactor}`
                  : unit !== 'sg'
                    ? ` (from ${value} ${gravityUnitLabels[unit]})`
                    : ''}
          </span>
        )}
      </div>
      {needsConfirm ? <Checkbox label="I have checked this reading: store it anyway" checked={confirm} onChange={(e) => setConfirm(e.target.checked)} /> : null}
      <Field label="Note" error={errors.note}>
        {({ invalid, ...c }) => <Input {...c} invalid={invalid} value={note} onChange={(e) => setNote(e.target.value)} autoComplete="off" />}
      </Field>
      <DialogActions>
        <Button variant="secondary" onClick={onClose} disabled={create.isPending}>
          Cancel
        </Button>
        <Button type="submit" pending={create.isPending}>
          Add the reading
        </Button>
      </DialogActions>
    </form>
  );
};

export const ReadingFormDialog = ({ open, onClose, batch }: ReadingFormDialogProps) => {
  const [busy, setBusy] = useState(false);
  return (
    <Dialog open={open} onClose={onClose} busy={busy} title="Add a reading" description={batch.name}>
      <ReadingForm batch={batch} onClose={onClose} onBusy={setBusy} />
    </Dialog>
  );
};
