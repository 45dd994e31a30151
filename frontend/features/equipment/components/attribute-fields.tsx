import type { UseFormReturn } from 'react-hook-form';
import { lineMaterials } from '../../../../shared/brewing/index.ts';
import { lineMaterialLabels } from '../../../../shared/cellar/carbonation-planner.ts';
import type { EquipmentKind } from '../../../../shared/schemas/equipment.ts';
import { Alert } from '@/components/ui/alert';
import { Field } from '@/components/ui/field';
import { Checkbox, Input, Select } from '@/components/ui/input';
import type { EquipmentFormValues } from '@/features/equipment/equipment-form';
import { unitLabels, type UnitSystem } from '@/lib/units';

/** What every kind's attribute fields get: the add or edit form, and the person's units. */
export interface AttributeFieldsProps {
  // The third parameter (what a submit hands on) differs between the add and the edit form.
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- as above
  form: UseFormReturn<EquipmentFormValues, unknown, any>;
  units: UnitSystem;
}

const grid = 'grid gap-4 sm:grid-cols-2';
/** `''` → null, so an empty box reads as "not given" rather than 0. */
const asNumber = { setValueAs: (v: unknown) => (v === '' || v === null || v === undefined ? null : Number(v)) };

export const FermenterAttributeFields = ({ form }: AttributeFieldsProps) => {
  const errors = form.formState.errors.attributes;
  return (
    <div className={grid}>
      <Field label="Shape" error={errors?.style?.message}>
        {(c) => (
          <Select {...c} {...form.register('attributes.style')}>
            <option value="bucket">Bucket</option>
            <option value="conical">Conical</option>
          </Select>
        )}
      </Field>
      <div className="flex items-end">
        <Checkbox label="Bottom valve" description="A valve or spigot at the bottom for racking and sampling" {...form.register('attributes.hasValve')} />
      </div>
    </div>
  );
};

export const KegAttributeFields = ({ form, units }: AttributeFieldsProps) => {
  const errors = form.formState.errors.attributes;
  return (
    <>
      <div className={grid}>
        <Field label="Serial" hint="As stamped on the keg" error={errors?.serial?.message}>
          {(c) => <Input {...c} autoComplete="off" {...form.register('attributes.serial')} />}
        </Field>
        <Field label="Lock" error={errors?.lock?.message}>
          {(c) => (
            <Select {...c} {...form.register('attributes.lock')}>
              <option value="ball">Ball lock</option>
              <option value="pin">Pin lock</option>
            </Select>
          )}
        </Field>
        <Field
          label={`Rated working pressure (${unitLabels[units].pressure})`}
          hint="As stamped on the keg; the carbonation planner will not go above it"
          error={errors?.ratedPressureKpa?.message}
        >
          {(c) => <Input {...c} type="number" step="any" inputMode="decimal" {...form.register('attributes.ratedPressureKpa', asNumber)} />}
        </Field>
      </div>
      <p className="text-xs text-ink-muted">
        Never exceed the keg’s or the regulator’s rated pressure and keep the pressure-relief valve working. Local codes and licensed practice come first.
      </p>
    </>
  );
};

export const TapAttributeFields = ({ form, units }: AttributeFieldsProps) => {
  const errors = form.formState.errors.attributes;
  const labels = unitLabels[units];
  return (
    <>
      <Field label="Position in the cold room" hint="e.g. Cold room, left wall, 1" error={errors?.position?.message}>
        {(c) => <Input {...c} autoComplete="off" {...form.register('attributes.position')} />}
      </Field>
      <div className={grid}>
        <Field label={`Line length (${labels.length})`} error={errors?.lineLengthM?.message}>
          {(c) => <Input {...c} type="number" step="any" inputMode="decimal" {...form.register('attributes.lineLengthM', asNumber)} />}
        </Field>
        <Field label={`Line inside diameter (${labels.smallLength})`} error={errors?.lineInsideDiameterMm?.message}>
          {(c) => <Input {...c} type="number" step="any" inputMode="decimal" {...form.register('attributes.lineInsideDiameterMm', asNumber)} />}
        </Field>
        <Field label="Line material" hint="Stainless is sized by its outside diameter" error={errors?.lineMaterial?.message}>
          {(c) => (
            <Select {...c} {...form.register('attributes.lineMaterial')}>
              <option value="">Not recorded (taken as vinyl)</option>
              {lineMaterials.map((m) => (
                <option key={m} value={m}>
                  {lineMaterialLabels[m]}
                </option>
              ))}
            </Select>
          )}
        </Field>
        <Field
          label="Line resistance (kPa/m)"
          hint="Measured or the maker's figure; empty uses the line type's usual figure"
          error={errors?.lineResistanceKpaPerM?.message}
        >
          {(c) => <Input {...c} type="number" step="any" inputMode="decimal" {...form.register('attributes.lineResistanceKpaPerM', asNumber)} />}
        </Field>
        <Field label={`Rise, keg to faucet (${labels.length})`} hint="Negative when the faucet sits below the keg; optional" error={errors?.riseM?.message}>
          {(c) => <Input {...c} type="number" step="any" inputMode="decimal" {...form.register('attributes.riseM', asNumber)} />}
        </Field>
        <Field label={`Cold room temperature (${labels.temperature})`} hint="Optional" error={errors?.coldRoomTempC?.message}>
          {(c) => <Input {...c} type="number" step="any" inputMode="decimal" {...form.register('attributes.coldRoomTempC', asNumber)} />}
        </Field>
      </div>
      <p className="text-xs text-ink-muted">
        The cold room is closed: CO2 displaces air. Keep it ventilated and heed the CO2 alarm. Local codes and licensed practice come first.
      </p>
    </>
  );
};

export const Co2CylinderAttributeFields = ({ form, units }: AttributeFieldsProps) => {
  const errors = form.formState.errors.attributes;
  return (
    <>
      <div className={grid}>
        <Field label={`Size (${unitLabels[units].mass} CO2)`} error={errors?.sizeKg?.message}>
          {(c) => <Input {...c} type="number" step="any" inputMode="decimal" {...form.register('attributes.sizeKg', asNumber)} />}
        </Field>
        <Field label="Fill (%)" error={errors?.fillPercent?.message}>
          {(c) => <Input {...c} type="number" step="1" min="0" max="100" inputMode="numeric" {...form.register('attributes.fillPercent', asNumber)} />}
        </Field>
        <Field label="Hydrostatic test due" error={errors?.hydroTestDue?.message}>
          {(c) => <Input {...c} type="date" {...form.register('attributes.hydroTestDue')} />}
        </Field>
      </div>
      <Alert tone="info" title="Safety">
        Keep the cylinder chained upright and never exceed a regulator’s rated pressure. CO2 displaces air in closed rooms: ventilate and keep the CO2 alarm on.
        Do not fill or use a cylinder past its test date. Local codes and licensed practice come first.
      </Alert>
    </>
  );
};

const fieldsByKind: Record<EquipmentKind, (props: AttributeFieldsProps) => React.JSX.Element> = {
  fermenter: FermenterAttributeFields,
  keg: KegAttributeFields,
  tap: TapAttributeFields,
  co2_cylinder: Co2CylinderAttributeFields,
};

/** The kind-specific fields of the add and edit forms. */
export const EquipmentAttributeFields = ({ kind, ...props }: AttributeFieldsProps & { kind: EquipmentKind }) => {
  const Fields = fieldsByKind[kind];
  return (
    <fieldset className="flex flex-col gap-4 rounded-md border border-line p-3">
      <legend className="px-1 text-sm font-medium text-ink">
        Details of the {kind === 'tap' ? 'tap position' : kind === 'co2_cylinder' ? 'CO2 cylinder' : kind}
      </legend>
      <Fields {...props} />
    </fieldset>
  );
};
