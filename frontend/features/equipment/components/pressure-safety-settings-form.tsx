import { inspectionKindLabels, inspectionKinds, pressureSafetySettingsSchema, type PressureSafetySettings } from '../../../../shared/schemas/inspections.ts';
import { NumberField } from '@/components/form/number-field';
import { SettingFormFrame, settingSection, type SettingFormProps } from '@/features/settings/components/setting-section';
import { useSettingForm } from '@/features/settings/hooks/use-setting-form';

const hints: Record<(typeof inspectionKinds)[number], string> = {
  pressure_test: 'Common practice: 24.',
  relief_valve: 'Common practice: 12.',
  seals: 'Common practice: 12.',
  hydrostatic_test: 'Often 60; some countries 120. Local rules decide.',
};

const PressureSafetyForm = ({ value, canEdit }: SettingFormProps<PressureSafetySettings>) => {
  const setting = useSettingForm<PressureSafetySettings>('pressure_safety', pressureSafetySettingsSchema, value, {
    savedText: 'Saved. New inspections without a next date use these intervals.',
    fields: ['dueSoonDays'],
  });
  const { form } = setting;
  return (
    <SettingFormFrame setting={setting} label="Pressure-vessel settings" canEdit={canEdit} submitLabel="Save the pressure-vessel settings">
      <fieldset disabled={!canEdit} className="grid gap-4 sm:grid-cols-2 lg:grid-cols-5">
        {inspectionKinds.map((k) => (
          <NumberField key={k} form={form} name={`intervalMonths.${k}`} label={`${inspectionKindLabels[k]} (months)`} hint={hints[k]} inputMode="numeric" />
        ))}
        <NumberField form={form} name="dueSoonDays" label="Warn ahead (days)" hint="Today and the maintenance list." inputMode="numeric" />
      </fieldset>
    </SettingFormFrame>
  );
};

/** Settings → Pressure vessels and gas: inspection intervals and how far ahead Today warns. */
export const PressureSafetySettingsSection = settingSection('pressure_safety', 'the pressure-vessel settings', PressureSafetyForm);
