import { fermentationSettingsSchema, type FermentationSettings } from '../../../../shared/schemas/batches.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Input } from '@/components/ui/input';
import { SettingLoader } from '@/features/settings/components/setting-loader';
import { useSettingForm } from '@/features/settings/hooks/use-setting-form';
import { asNumber } from '@/components/form/decimal';

/** Settings → Fermentation: the stable-gravity test (common practice ±0.001 over 3 days) and the correction defaults. */
export const FermentationSettingsSection = ({ canEdit }: { canEdit: boolean }) => (
  <SettingLoader<FermentationSettings> settingKey="fermentation" what="the fermentation settings">
    {(value) => <FermentationSettingsForm value={value} canEdit={canEdit} />}
  </SettingLoader>
);

const FermentationSettingsForm = ({ value, canEdit }: { value: FermentationSettings; canEdit: boolean }) => {
  const { form, save, message, onSubmit } = useSettingForm<FermentationSettings>('fermentation', fermentationSettingsSchema, value, {
    savedText: 'Fermentation settings saved. Every batch page uses them from now on.',
    fields: ['stableToleranceSg', 'stableSpanDays', 'hydrometerCalibrationC', 'wortCorrectionFactor'],
  });
  const errors = form.formState.errors;
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Fermentation settings">
      {message ? <Alert tone={message.tone}>{message.text}</Alert> : null}
      <fieldset disabled={!canEdit} className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        <Field label="Stable within (SG)" hint="Common practice: 0.001." error={errors.stableToleranceSg?.message}>
          {(c) => <Input {...c} inputMode="decimal" {...form.register('stableToleranceSg', asNumber)} />}
        </Field>
        <Field label="Over (days)" hint="Common practice: 2 to 3." error={errors.stableSpanDays?.message}>
          {(c) => <Input {...c} inputMode="decimal" {...form.register('stableSpanDays', asNumber)} />}
        </Field>
        <Field label="Hydrometer calibration (°C)" hint="Usually 20 °C (some read at 15.56 °C)." error={errors.hydrometerCalibrationC?.message}>
          {(c) => <Input {...c} inputMode="decimal" {...form.register('hydrometerCalibrationC', asNumber)} />}
        </Field>
        <Field label="Refractometer wort factor" hint="Common practice: 1.04." error={errors.wortCorrectionFactor?.message}>
          {(c) => <Input {...c} inputMode="decimal" {...form.register('wortCorrectionFactor', asNumber)} />}
        </Field>
      </fieldset>
      {canEdit ? (
        <div>
          <Button type="submit" pending={save.isPending}>
            Save the fermentation settings
          </Button>
        </div>
      ) : null}
    </form>
  );
};
