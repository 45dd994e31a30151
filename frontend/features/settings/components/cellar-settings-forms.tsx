import type { Path } from 'react-hook-form';
import {
  carbonationSettingsSchema,
  chemicalSteps,
  concentrationUnits,
  sanitationSettingsSchema,
  type CarbonationSettings,
  type SanitationSettings,
} from '../../../../shared/schemas/cellar-settings.ts';
import { ChoiceField, fieldError, OptionList, TextField } from '@/components/form/bound-fields';
import { NumberField } from '@/components/form/number-field';
import { UnitNumberField } from '@/components/form/unit-number-input';
import { Alert } from '@/components/ui/alert';
import { Checkbox } from '@/components/ui/input';
import { Cautions } from '@/components/safety/cautions';
import { SettingFormFrame, SettingRows, settingSection, type SettingFormProps } from '@/features/settings/components/setting-section';
import { useSettingForm } from '@/features/settings/hooks/use-setting-form';
import { useUnits } from '@/hooks/use-units';
import type { Quantity } from '@/lib/units';

const wholeNumber = { type: 'number', min: 0, step: 1 } as const;
const anyNumber = { type: 'number', step: 'any' } as const;

const dayCount = { ...wholeNumber, min: 1 } as const;
const minutes = { ...anyNumber, min: 0 } as const;

/** The sanitation rules' number boxes, in order. */
const sanitationNumbers: { name: Path<SanitationSettings>; label: string; hint?: string; box: typeof wholeNumber | typeof dayCount | typeof minutes }[] = [
  { name: 'freshnessDays', label: 'Freshness window (days)', hint: 'How long a sanitized vessel stays ready.', box: dayCount },
  { name: 'cleanWithinDays', label: 'Clean within (days)', hint: 'After a vessel is emptied or returned; later cycles are flagged.', box: dayCount },
  { name: 'minimumContactMinutes.clean', label: 'Minimum clean contact (min)', box: minutes },
  { name: 'minimumContactMinutes.sanitize', label: 'Minimum sanitize contact (min)', box: minutes },
  {
    name: 'minimumPurgeSeconds',
    label: 'Minimum CO2 flush (s)',
    hint: 'A shorter timed flush must be recorded as an exception; a push-out purge names its second keg instead.',
    box: wholeNumber,
  },
  { name: 'co2GramsPerPurge', label: 'CO2 per purge (g)', hint: 'Recorded for billing when no figure is given.', box: wholeNumber },
  { name: 'co2GramsPerKegFill', label: 'CO2 per keg filled (g)', box: wholeNumber },
];

const chemicalStepLabels = { clean: 'Clean', sanitize: 'Sanitize' } as const;

/** A new row of the chemical list: a sanitizer at 1 mL/L for 2 minutes, to be named. */
const newChemical = (count: number): SanitationSettings['chemicals'][number] => ({
  id: `chemical-${count + 1}`,
  name: '',
  step: 'sanitize',
  defaultConcentration: 1,
  unit: 'mL/L',
  recommendedContactMinutes: 2,
  minConcentration: 1,
  maxConcentration: 1,
  caustic: false,
  active: true,
});

const SanitationForm = ({ value, canEdit }: SettingFormProps<SanitationSettings>) => {
  const setting = useSettingForm<SanitationSettings>('sanitation', sanitationSettingsSchema, value, {
    savedText: 'Sanitation rules saved. New cycles are judged by them from now on.',
    fields: ['freshnessDays', 'cleanWithinDays', 'minimumPurgeSeconds', 'co2GramsPerPurge', 'co2GramsPerKegFill'],
  });
  const { form } = setting;
  const listError = fieldError(form, 'chemicals');
  return (
    <SettingFormFrame setting={setting} label="Sanitation rules" canEdit={canEdit} submitLabel="Save sanitation rules">
      <fieldset disabled={!canEdit} className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
        {sanitationNumbers.map(({ name, label, hint, box }) => (
          <NumberField key={name} form={form} name={name} label={label} hint={hint} {...box} />
        ))}
      </fieldset>
      <fieldset disabled={!canEdit} className="flex flex-col gap-2">
        <legend className="mb-1 text-sm font-medium">Cleaners and sanitizers</legend>
        {listError ? <Alert tone="error">{listError}</Alert> : null}
        <SettingRows
          form={form}
          name="chemicals"
          canEdit={canEdit}
          size="sm"
          newRow={newChemical}
          addLabel="Add a chemical"
          removeLabel={(f) => `Remove ${f.name}`}
        >
          {({ index: i, field, remove }) => (
            <div
              key={field.id}
              className="grid gap-2 rounded-md border border-line p-2 sm:grid-cols-3 lg:grid-cols-6"
              aria-label={`Chemical ${i + 1}`}
              role="group"
            >
              <TextField form={form} name={`chemicals.${i}.id`} label="Id" />
              <TextField form={form} name={`chemicals.${i}.name`} label="Name" />
              <ChoiceField form={form} name={`chemicals.${i}.step`} label="Step">
                <OptionList values={chemicalSteps} labels={chemicalStepLabels} />
              </ChoiceField>
              <NumberField form={form} name={`chemicals.${i}.defaultConcentration`} label="Usual strength" {...anyNumber} />
              <ChoiceField form={form} name={`chemicals.${i}.unit`} label="Unit">
                <OptionList values={concentrationUnits} labels={(u) => u} />
              </ChoiceField>
              <NumberField form={form} name={`chemicals.${i}.recommendedContactMinutes`} label="Usual contact" {...anyNumber} />
              <NumberField form={form} name={`chemicals.${i}.minConcentration`} label="Lowest strength" {...anyNumber} />
              <NumberField form={form} name={`chemicals.${i}.maxConcentration`} label="Highest strength" {...anyNumber} />
              <NumberField form={form} name={`chemicals.${i}.minimumContactMinutes`} label="Minimum contact (min)" {...anyNumber} empty="omit" />
              <div className="flex flex-wrap items-end gap-2 sm:col-span-2">
                <Checkbox label="In use" {...form.register(`chemicals.${i}.active`)} />
                <Checkbox label="Caustic (vent CO2 first)" {...form.register(`chemicals.${i}.caustic`)} />
                {remove}
              </div>
            </div>
          )}
        </SettingRows>
      </fieldset>
      <Cautions kind="chemicals" />
    </SettingFormFrame>
  );
};

/** Settings: the sanitation rules (chemical list, minimum contact times, freshness window). */
export const SanitationSettingsSection = settingSection('sanitation', 'the sanitation rules', SanitationForm);

/**
 * The carbonation defaults' number boxes, in order: quantities in the person's units (bar or psi, °C or °F,
 * m or ft), counts as they are. The faucet allowance is in kPa for everyone, as the taps' line resistance is.
 */
const carbonationNumbers: { name: Exclude<keyof CarbonationSettings, 'stylePresets'>; label: string; hint?: string; kind?: Quantity }[] = [
  { name: 'coldRoomTempC', label: 'Cold room', kind: 'temperature' },
  { name: 'altitudeM', label: 'Altitude', hint: 'Gauges read against the local air pressure.', kind: 'length' },
  { name: 'maxPlanPressureKpa', label: 'Highest regulator setting', hint: 'Below every keg’s and regulator’s rating.', kind: 'pressure' },
  { name: 'holdDays', label: 'Set and hold (days)' },
  { name: 'fastStartPressureKpa', label: 'Fast-start pressure', kind: 'pressure' },
  { name: 'fastStartHours', label: 'Fast-start time (hours)' },
  { name: 'settleDays', label: 'Days at serving pressure after a fast start' },
  { name: 'lineFixedKpa', label: 'Faucet and coupler allowance (kPa)' },
];

const CarbonationForm = ({ value, canEdit }: SettingFormProps<CarbonationSettings>) => {
  const setting = useSettingForm<CarbonationSettings>('carbonation', carbonationSettingsSchema, value, {
    savedText: 'Carbonation defaults saved.',
    fields: ['coldRoomTempC', 'altitudeM', 'maxPlanPressureKpa', 'holdDays', 'fastStartPressureKpa', 'fastStartHours', 'settleDays', 'lineFixedKpa'],
  });
  const { form } = setting;
  const { labels } = useUnits();
  return (
    <SettingFormFrame setting={setting} label="Carbonation defaults" canEdit={canEdit} submitLabel="Save carbonation defaults">
      <fieldset disabled={!canEdit} className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        {carbonationNumbers.map(({ name, label, hint, kind }) =>
          kind ? (
            <UnitNumberField key={name} control={form.control} name={name} kind={kind} apiDigits={2} label={`${label} (${labels[kind]})`} hint={hint} />
          ) : (
            <NumberField key={name} form={form} name={name} label={label} hint={hint} {...anyNumber} />
          ),
        )}
      </fieldset>
      <fieldset disabled={!canEdit} className="flex flex-col gap-2">
        <legend className="mb-1 text-sm font-medium">CO2 volumes by style family</legend>
        <SettingRows form={form} name="stylePresets" canEdit={canEdit} size="sm" newRow={() => ({ family: '', volumes: 2.4 })} addLabel="Add a style family">
          {({ index, field, remove }) => (
            <div key={field.id} className="grid grid-cols-[1fr_8rem_auto] items-end gap-2">
              <TextField form={form} name={`stylePresets.${index}.family`} label="Family" />
              <NumberField form={form} name={`stylePresets.${index}.volumes`} label="Volumes" type="number" step="0.1" />
              {remove}
            </div>
          )}
        </SettingRows>
      </fieldset>
      <Cautions kind="carbonation" />
    </SettingFormFrame>
  );
};

/** Settings: what the carbonation planner proposes. */
export const CarbonationSettingsSection = settingSection('carbonation', 'the carbonation defaults', CarbonationForm);
