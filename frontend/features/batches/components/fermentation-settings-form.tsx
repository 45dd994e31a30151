import { fermentationSettingsSchema, type FermentationSettings } from '../../../../shared/schemas/batches.ts';
import { NumberField } from '@/components/form/number-field';
import { UnitNumberField } from '@/components/form/unit-number-input';
import { SettingFormFrame, settingSection, type SettingFormProps } from '@/features/settings/components/setting-section';
import { useSettingForm } from '@/features/settings/hooks/use-setting-form';
import { useUnits } from '@/hooks/use-units';

const FermentationSettingsForm = ({ value, canEdit }: SettingFormProps<FermentationSettings>) => {
  const setting = useSettingForm<FermentationSettings>('fermentation', fermentationSettingsSchema, value, {
    savedText: 'Fermentation settings saved. Every batch page uses them from now on.',
    fields: ['stableToleranceSg', 'stableSpanDays', 'hydrometerCalibrationC', 'wortCorrectionFactor'],
  });
  const { form } = setting;
  const units = useUnits();
  return (
    <SettingFormFrame setting={setting} label="Fermentation settings" canEdit={canEdit} submitLabel="Save the fermentation settings">
      <fieldset disabled={!canEdit} className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        <NumberField form={form} name="stableToleranceSg" label="Stable within (SG)" hint="Common practice: 0.001." inputMode="decimal" />
        <NumberField form={form} name="stableSpanDays" label="Over (days)" hint="Common practice: 2 to 3." inputMode="decimal" />
        <UnitNumberField
          control={form.control}
          name="hydrometerCalibrationC"
          kind="temperature"
          apiDigits={2}
          label={`Hydrometer calibration (${units.labels.temperature})`}
          hint={`Usually ${units.temperature(20, { digits: 0 })} (some read at ${units.temperature(15.56, { digits: 2 })}).`}
        />
        <NumberField form={form} name="wortCorrectionFactor" label="Refractometer wort factor" hint="Common practice: 1.04." inputMode="decimal" />
      </fieldset>
    </SettingFormFrame>
  );
};

/** Settings → Fermentation: the stable-gravity test (common practice ±0.001 over 3 days) and the correction defaults. */
export const FermentationSettingsSection = settingSection('fermentation', 'the fermentation settings', FermentationSettingsForm);
