import { useFieldArray } from 'react-hook-form';
import {
  carbonationSettingsSchema,
  concentrationUnits,
  sanitationSettingsSchema,
  type CarbonationSettings,
  type SanitationSettings,
} from '../../../../shared/schemas/cellar-settings.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Checkbox, Input, Select } from '@/components/ui/input';
import { Cautions } from '@/components/safety/cautions';
import { SettingLoader } from '@/features/settings/components/setting-loader';
import { useSettingForm } from '@/features/settings/hooks/use-setting-form';
import { asNumber, asOptionalNumber } from '@/components/form/decimal';

/** Settings: the sanitation rules (chemical list, minimum contact times, freshness window). */
export const SanitationSettingsSection = ({ canEdit }: { canEdit: boolean }) => (
  <SettingLoader<SanitationSettings> settingKey="sanitation" what="the sanitation rules">
    {(value) => <SanitationForm value={value} canEdit={canEdit} />}
  </SettingLoader>
);

const SanitationForm = ({ value, canEdit }: { value: SanitationSettings; canEdit: boolean }) => {
  const { form, save, message, onSubmit } = useSettingForm<SanitationSettings>('sanitation', sanitationSettingsSchema, value, {
    savedText: 'Sanitation rules saved. New cycles are judged by them from now on.',
    fields: ['freshnessDays', 'cleanWithinDays', 'minimumPurgeSeconds', 'co2GramsPerPurge', 'co2GramsPerKegFill'],
  });
  const chemicals = useFieldArray({ control: form.control, name: 'chemicals' });
  const e = form.formState.errors;
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Sanitation rules">
      {message ? <Alert tone={message.tone}>{message.text}</Alert> : null}
      <fieldset disabled={!canEdit} className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
        <Field label="Freshness window (days)" hint="How long a sanitized vessel stays ready." error={e.freshnessDays?.message}>
          {(c) => <Input {...c} type="number" min={1} step={1} {...form.register('freshnessDays', asNumber)} />}
        </Field>
        <Field label="Clean within (days)" hint="After a vessel is emptied or returned; later cycles are flagged." error={e.cleanWithinDays?.message}>
          {(c) => <Input {...c} type="number" min={1} step={1} {...form.register('cleanWithinDays', asNumber)} />}
        </Field>
        <Field label="Minimum clean contact (min)" error={e.minimumContactMinutes?.clean?.message}>
          {(c) => <Input {...c} type="number" min={0} step="any" {...form.register('minimumContactMinutes.clean', asNumber)} />}
        </Field>
        <Field label="Minimum sanitize contact (min)" error={e.minimumContactMinutes?.sanitize?.message}>
          {(c) => <Input {...c} type="number" min={0} step="any" {...form.register('minimumContactMinutes.sanitize', asNumber)} />}
        </Field>
        <Field
          label="Minimum CO2 flush (s)"
          hint="A shorter timed flush must be recorded as an exception; a push-out purge names its second keg instead."
          error={e.minimumPurgeSeconds?.message}
        >
          {(c) => <Input {...c} type="number" min={0} step={1} {...form.register('minimumPurgeSeconds', asNumber)} />}
        </Field>
        <Field label="CO2 per purge (g)" hint="Recorded for billing when no figure is given." error={e.co2GramsPerPurge?.message}>
          {(c) => <Input {...c} type="number" min={0} step={1} {...form.register('co2GramsPerPurge', asNumber)} />}
        </Field>
        <Field label="CO2 per keg filled (g)" error={e.co2GramsPerKegFill?.message}>
          {(c) => <Input {...c} type="number" min={0} step={1} {...form.register('co2GramsPerKegFill', asNumber)} />}
        </Field>
      </fieldset>
      <fieldset disabled={!canEdit} className="flex flex-col gap-2">
        <legend className="mb-1 text-sm font-medium">Cleaners and sanitizers</legend>
        {e.chemicals?.message || e.chemicals?.root?.message ? <Alert tone="error">{e.chemicals?.message ?? e.chemicals?.root?.message}</Alert> : null}
        {chemicals.fields.map((f, i) => (
          <div key={f.id} className="grid gap-2 rounded-md border border-line p-2 sm:grid-cols-3 lg:grid-cols-6" aria-label={`Chemical ${i + 1}`} role="group">
            <Field label="Id" error={e.chemicals?.[i]?.id?.message}>
              {(c) => <Input {...c} {...form.register(`chemicals.${i}.id`)} />}
            </Field>
            <Field label="Name" error={e.chemicals?.[i]?.name?.message}>
              {(c) => <Input {...c} {...form.register(`chemicals.${i}.name`)} />}
            </Field>
            <Field label="Step">
              {(c) => (
                <Select {...c} {...form.register(`chemicals.${i}.step`)}>
                  <option value="clean">Clean</option>
                  <option value="sanitize">Sanitize</option>
                </Select>
              )}
            </Field>
            <Field label="Usual strength" error={e.chemicals?.[i]?.defaultConcentration?.message}>
              {(c) => <Input {...c} type="number" step="any" {...form.register(`chemicals.${i}.defaultConcentration`, asNumber)} />}
            </Field>
            <Field label="Unit">
              {(c) => (
                <Select {...c} {...form.register(`chemicals.${i}.unit`)}>
                  {concentrationUnits.map((u) => (
                    <option key={u} value={u}>
                      {u}
                    </option>
                  ))}
                </Select>
              )}
            </Field>
            <Field label="Usual contact" error={e.chemicals?.[i]?.recommendedContactMinutes?.message}>
              {(c) => <Input {...c} type="number" step="any" {...form.register(`chemicals.${i}.recommendedContactMinutes`, asNumber)} />}
            </Field>
            <Field label="Lowest strength" error={e.chemicals?.[i]?.minConcentration?.message}>
              {(c) => <Input {...c} type="number" step="any" {...form.register(`chemicals.${i}.minConcentration`, asNumber)} />}
            </Field>
            <Field label="Highest strength" error={e.chemicals?.[i]?.maxConcentration?.message}>
              {(c) => <Input {...c} type="number" step="any" {...form.register(`chemicals.${i}.maxConcentration`, asNumber)} />}
            </Field>
            <Field label="Minimum contact (min)" error={e.chemicals?.[i]?.minimumContactMinutes?.message}>
              {(c) => <Input {...c} type="number" step="any" {...form.register(`chemicals.${i}.minimumContactMinutes`, asOptionalNumber)} />}
            </Field>
            <div className="flex flex-wrap items-end gap-2 sm:col-span-2">
              <Checkbox label="In use" {...form.register(`chemicals.${i}.active`)} />
              <Checkbox label="Caustic (vent CO2 first)" {...form.register(`chemicals.${i}.caustic`)} />
              {canEdit ? (
                <Button variant="ghost" size="sm" onClick={() => chemicals.remove(i)} aria-label={`Remove ${f.name}`}>
                  Remove
                </Button>
              ) : null}
            </div>
          </div>
        ))}
        {canEdit ? (
          <div>
            <Button
              variant="secondary"
              size="sm"
              onClick={() =>
                chemicals.append({
                  id: `chemical-${chemicals.fields.length + 1}`,
                  name: '',
                  step: 'sanitize',
                  defaultConcentration: 1,
                  unit: 'mL/L',
                  recommendedContactMinutes: 2,
                  minConcentration: 1,
                  maxConcentration: 1,
                  caustic: false,
                  active: true,
                })
              }
            >
              Add a chemical
            </Button>
          </div>
        ) : null}
      </fieldset>
      <Cautions kind="chemicals" />
      {canEdit ? (
        <div>
          <Button type="submit" pending={save.isPending}>
            Save sanitation rules
          </Button>
        </div>
      ) : null}
    </form>
  );
};

/** Settings: what the carbonation planner proposes. */
export const CarbonationSettingsSection = ({ canEdit }: { canEdit: boolean }) => (
  <SettingLoader<CarbonationSettings> settingKey="carbonation" what="the carbonation defaults">
    {(value) => <CarbonationForm value={value} canEdit={canEdit} />}
  </SettingLoader>
);

const CarbonationForm = ({ value, canEdit }: { value: CarbonationSettings; canEdit: boolean }) => {
  const { form, save, message, onSubmit } = useSettingForm<CarbonationSettings>('carbonation', carbonationSettingsSchema, value, {
    savedText: 'Carbonation defaults saved.',
    fields: ['coldRoomTempC', 'altitudeM', 'maxPlanPressureKpa', 'holdDays', 'fastStartPressureKpa', 'fastStartHours', 'settleDays', 'lineFixedKpa'],
  });
  const presets = useFieldArray({ control: form.control, name: 'stylePresets' });
  const e = form.formState.errors;
  const fields: [keyof CarbonationSettings, string, string?][] = [
    ['coldRoomTempC', 'Cold room (°C)'],
    ['altitudeM', 'Altitude (m)', 'Gauges read against the local air pressure.'],
    ['maxPlanPressureKpa', 'Highest regulator setting (kPa)', 'Below every keg’s and regulator’s rating.'],
    ['holdDays', 'Set and hold (days)'],
    ['fastStartPressureKpa', 'Fast-start pressure (kPa)'],
    ['fastStartHours', 'Fast-start time (hours)'],
    ['settleDays', 'Days at serving pressure after a fast start'],
    ['lineFixedKpa', 'Faucet and coupler allowance (kPa)'],
  ];
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Carbonation defaults">
      {message ? <Alert tone={message.tone}>{message.text}</Alert> : null}
      <fieldset disabled={!canEdit} className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        {fields.map(([key, label, hint]) => (
          <Field key={key} label={label} hint={hint} error={(e[key] as { message?: string } | undefined)?.message}>
            {(c) => <Input {...c} type="number" step="any" {...form.register(key, asNumber)} />}
          </Field>
        ))}
      </fieldset>
      <fieldset disabled={!canEdit} className="flex flex-col gap-2">
        <legend className="mb-1 text-sm font-medium">CO2 volumes by style family</legend>
        {presets.fields.map((f, i) => (
          <div key={f.id} className="grid grid-cols-[1fr_8rem_auto] items-end gap-2">
            <Field label="Family" error={e.stylePresets?.[i]?.family?.message}>
              {(c) => <Input {...c} {...form.register(`stylePresets.${i}.family`)} />}
            </Field>
            <Field label="Volumes" error={e.stylePresets?.[i]?.volumes?.message}>
              {(c) => <Input {...c} type="number" step="0.1" {...form.register(`stylePresets.${i}.volumes`, asNumber)} />}
            </Field>
            {canEdit ? (
              <Button variant="ghost" size="sm" onClick={() => presets.remove(i)}>
                Remove
              </Button>
            ) : null}
          </div>
        ))}
        {canEdit ? (
          <div>
            <Button variant="secondary" size="sm" onClick={() => presets.append({ family: '', volumes: 2.4 })}>
              Add a style family
            </Button>
          </div>
        ) : null}
      </fieldset>
      <Cautions kind="carbonation" />
      {canEdit ? (
        <div>
          <Button type="submit" pending={save.isPending}>
            Save carbonation defaults
          </Button>
        </div>
      ) : null}
    </form>
  );
};
