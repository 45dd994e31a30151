import { inspectionKindLabels, inspectionKinds, pressureSafetySettingsSchema, type PressureSafetySettings } from '../../../../shared/schemas/inspections.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Input } from '@/components/ui/input';
import { SettingLoader } from '@/features/settings/components/setting-loader';
import { useSettingForm } from '@/features/settings/hooks/use-setting-form';
import { asNumber } from '@/components/form/decimal';

const hints: Record<(typeof inspectionKinds)[number], string> = {
  pressure_test: 'Common practice: 24.',
  relief_valve: 'Common practice: 12.',
  seals: 'Common practice: 12.',
  hydrostatic_test: 'Often 60; some countries 120. Local rules decide.',
};

/** Settings → Pressure vessels and gas: inspection intervals and how far ahead Today warns. */
export const PressureSafetySettingsSection = ({ canEdit }: { canEdit: boolean }) => (
  <SettingLoader<PressureSafetySettings> settingKey="pressure_safety" what="the pressure-vessel settings">
    {(value) => <PressureSafetyForm value={value} canEdit={canEdit} />}
  </SettingLoader>
);

const PressureSafetyForm = ({ value, canEdit }: { value: PressureSafetySettings; canEdit: boolean }) => {
  const { form, save, message, onSubmit } = useSettingForm<PressureSafetySettings>('pressure_safety', pressureSafetySettingsSchema, value, {
    savedText: 'Saved. New inspections without a next date use these intervals.',
    fields: ['dueSoonDays'],
  });
  const errors = form.formState.errors;
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Pressure-vessel settings">
      {message ? <Alert tone={message.tone}>{message.text}</Alert> : null}
      <fieldset disabled={!canEdit} className="grid gap-4 sm:grid-cols-2 lg:grid-cols-5">
        {inspectionKinds.map((k) => (
          <Field key={k} label={`${inspectionKindLabels[k]} (months)`} hint={hints[k]} error={errors.intervalMonths?.[k]?.message}>
            {(c) => <Input {...c} inputMode="numeric" {...form.register(`intervalMonths.${k}`, asNumber)} />}
          </Field>
        ))}
        <Field label="Warn ahead (days)" hint="Today and the maintenance list." error={errors.dueSoonDays?.message}>
          {(c) => <Input {...c} inputMode="numeric" {...form.register('dueSoonDays', asNumber)} />}
        </Field>
      </fieldset>
      {canEdit ? (
        <div>
          <Button type="submit" pending={save.isPending}>
            Save the pressure-vessel settings
          </Button>
        </div>
      ) : null}
    </form>
  );
};
