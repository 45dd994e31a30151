import { useMemo } from 'react';
import { z } from 'zod';
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
import { createReadingSchema, gravityUnitLabels, gravityUnits, type BatchDetail } from '../../../../shared/schemas/batches.ts';
import { ChoiceField, OptionList, TextField } from '@/components/form/bound-fields';
import { FormFrame } from '@/components/form/form-frame';
import { UnitNumberField } from '@/components/form/unit-number-input';
import { useApiForm } from '@/components/form/use-api-form';
import { Field } from '@/components/ui/field';
import { FormDialog } from '@/components/ui/form-dialog';
import { Checkbox, Select } from '@/components/ui/input';
import { useNotice } from '@/components/ui/notice';
import { useCreateReading } from '@/features/batches/api/readings';
import { formatSg } from '@/features/batches/components/gravity-format';
import { useUnits } from '@/hooks/use-units';

/** Now, as a datetime-local value in the browser's time zone. */
function localNow(): string {
  const d = new Date();
  d.setSeconds(0, 0);
  return new Date(d.getTime() - d.getTimezoneOffset() * 60_000).toISOString().slice(0, 16);
}

/**
 * The form's values: the shared reading schema, with the time as the browser's `datetime-local`
 * text (sent as an instant with its offset) and the temperature already in °C (the unit-aware input
 * converts what the person types).
 */
const readingFormSchema = createReadingSchema.extend({
  takenAt: z.string().refine((local) => !Number.isNaN(new Date(local).getTime()), 'Give a time like 2026-10-03T14:05:00+02:00'),
  correctTemperature: z.boolean(),
  note: z.string().max(500, 'Keep the note under 500 characters'),
  confirm: z.boolean(),
});
type ReadingFormValues = z.infer<typeof readingFormSchema>;
const scaleLabels = { sg: 'SG (hydrometer)', plato: '°Plato', brix: 'Brix (refractometer)' } as const;
const readingFields = ['takenAt', 'gravity', 'unit', 'temperatureC', 'correctTemperature', 'note', 'method', 'confirm'] as const;

export interface ReadingFormDialogProps {
  open: boolean;
  onClose: () => void;
  batch: BatchDetail;
}

const ReadingForm = ({ batch, onClose }: Omit<ReadingFormDialogProps, 'open'>) => {
  const units = useUnits();
  const create = useCreateReading(batch.id);
  const notice = useNotice();
  const { form, message, showError, showProblem, submit } = useApiForm<ReadingFormValues>(readingFormSchema, {
    defaultValues: {
      takenAt: localNow(),
      gravity: null as never,
      unit: 'sg',
      temperatureC: null,
      correctTemperature: true,
      note: '',
      method: null,
      confirm: false,
    },
    fields: readingFields,
  });
  const { register, setValue, setError, control } = form;
  const errors = form.formState.errors;
  const [takenAt, gravity, unit, tempValue, correct, chosenMethod, confirm] = form.watch([
    'takenAt',
    'gravity',
    'unit',
    'temperatureC',
    'correctTemperature',
    'method',
    'confirm',
  ]);
  const value = typeof gravity === 'number' ? gravity : null;
  const tempC = typeof tempValue === 'number' && Number.isFinite(tempValue) ? tempValue : null;
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

  const onSubmit = submit((values) => {
    if (preview && 'error' in preview) return setError('gravity', { message: preview.error ?? 'Check the gravity' });
    if (check?.refusal) return setError('gravity', { message: check.refusal });
    const parsed = createReadingSchema.safeParse({
      ...values,
      takenAt: new Date(values.takenAt).toISOString(),
      method: values.unit === 'brix' ? method : null,
      confirm: needsConfirm && values.confirm,
    });
    if (!parsed.success) return showError(parsed.error.issues.map((issue) => issue.message).join(' '));
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
      onError: showProblem,
    });
  });

  const range = gravityEntryRanges[unit];
  return (
    <FormFrame onSubmit={onSubmit} message={message} pending={create.isPending} onCancel={onClose} submitLabel="Add the reading">
      <TextField form={form} name="takenAt" label="Taken at" type="datetime-local" />
      <div className="grid gap-4 sm:grid-cols-[1fr_9rem]">
        <UnitNumberField
          control={control}
          name="gravity"
          kind={{ label: '' }}
          label="Gravity"
          hint={`${range.label}: ${range.min} to ${range.max}`}
          autoFocus
          placeholder={unit === 'sg' ? '1.048' : '12.0'}
        />
        <ChoiceField form={form} name="unit" label="Scale">
          <OptionList values={gravityUnits} labels={scaleLabels} />
        </ChoiceField>
      </div>
      <UnitNumberField
        control={control}
        name="temperatureC"
        kind="temperature"
        apiDigits={2}
        label={`Sample temperature (${units.labels.temperature})`}
        hint="Optional."
      />
      {unit === 'brix' ? (
        <Field
          label="Refractometer sample"
          hint="Wort has no alcohol yet; a fermenting or finished sample is corrected for alcohol with the batch’s original gravity."
          error={errors.method?.message}
        >
          {({ invalid, ...c }) => (
            <Select {...c} invalid={invalid} value={method} onChange={(e) => setValue('method', e.target.value as BrixMethod)}>
              <OptionList values={brixMethods} labels={brixMethodLabels} />
            </Select>
          )}
        </Field>
      ) : null}
      {unit !== 'brix' ? (
        <Checkbox
          label={`Correct to the hydrometer’s calibration temperature (${units.temperature(batch.corrections.hydrometerCalibrationC, { digits: 0 })})`}
          {...register('correctTemperature')}
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
      {needsConfirm ? <Checkbox label="I have checked this reading: store it anyway" {...register('confirm')} /> : null}
      <TextField form={form} name="note" label="Note" autoComplete="off" />
    </FormFrame>
  );
};

export const ReadingFormDialog = ({ open, onClose, batch }: ReadingFormDialogProps) => (
  <FormDialog open={open} onClose={onClose} title="Add a reading" description={batch.name}>
    <ReadingForm batch={batch} onClose={onClose} />
  </FormDialog>
);
