import type { Path, UseFormReturn } from 'react-hook-form';
import { lineMaterials } from '../../../../shared/brewing/index.ts';
import { lineMaterialLabels } from '../../../../shared/cellar/carbonation-planner.ts';
import type { EquipmentKind } from '../../../../shared/schemas/equipment.ts';
import { OptionList } from '@/components/form/bound-fields';
import { UnitNumberField, type NumberKind } from '@/components/form/unit-number-input';
import { Alert } from '@/components/ui/alert';
import { InputField, SelectField } from '@/components/ui/field';
import { Checkbox } from '@/components/ui/input';
import { kindHasCapacity, type EquipmentFormValues } from '@/features/equipment/equipment-form';
import { unitLabels, type UnitSystem } from '@/lib/units';

/** What every kind's attribute fields get: the add or edit form, and the person's units. */
export interface AttributeFieldsProps {
  // The third parameter (what a submit hands on) differs between the add and the edit form.
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- as above
  form: UseFormReturn<EquipmentFormValues, unknown, any>;
  units: UnitSystem;
}

const grid = 'grid gap-4 sm:grid-cols-2';

interface AmountFieldProps extends AttributeFieldsProps {
  name: Path<EquipmentFormValues>;
  /** What the number measures: its unit follows the person's preference, shown in the label and the box. */
  kind: NumberKind;
  label: string;
  /** Words after the unit in the label ("kg CO2"). */
  unitOf?: string;
  hint?: string;
}

/**
 * A number box in the person's units (a decimal comma is taken) over a field that holds the API's value;
 * an empty box is "not given" (null).
 */
const AmountField = ({ form, units, name, kind, label, unitOf, hint }: AmountFieldProps) => (
  <UnitNumberField<EquipmentFormValues>
    control={form.control}
    name={name}
    kind={kind}
    units={units}
    apiDigits={4}
    label={`${label} (${[typeof kind === 'string' ? unitLabels[units][kind] : kind.label, unitOf].filter(Boolean).join(' ')})`}
    hint={hint}
  />
);

export const FermenterAttributeFields = ({ form }: AttributeFieldsProps) => {
  const errors = form.formState.errors.attributes;
  return (
    <div className={grid}>
      <SelectField label="Shape" error={errors?.style?.message} {...form.register('attributes.style')}>
        <option value="bucket">Bucket</option>
        <option value="conical">Conical</option>
      </SelectField>
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
        <InputField label="Serial" hint="As stamped on the keg" error={errors?.serial?.message} autoComplete="off" {...form.register('attributes.serial')} />
        <SelectField label="Lock" error={errors?.lock?.message} {...form.register('attributes.lock')}>
          <option value="ball">Ball lock</option>
          <option value="pin">Pin lock</option>
        </SelectField>
        <AmountField
          form={form}
          units={units}
          name="attributes.ratedPressureKpa"
          kind="pressure"
          label="Rated working pressure"
          hint="As stamped on the keg; the carbonation planner will not go above it"
        />
      </div>
      <p className="text-xs text-ink-muted">
        Never exceed the keg’s or the regulator’s rated pressure and keep the pressure-relief valve working. Local codes and licensed practice come first.
      </p>
    </>
  );
};

export const TapAttributeFields = ({ form, units }: AttributeFieldsProps) => {
  const errors = form.formState.errors.attributes;
  return (
    <>
      <InputField
        label="Position in the cold room"
        hint="e.g. Cold room, left wall, 1"
        error={errors?.position?.message}
        autoComplete="off"
        {...form.register('attributes.position')}
      />
      <div className={grid}>
        <AmountField form={form} units={units} name="attributes.lineLengthM" kind="length" label="Line length" />
        <AmountField form={form} units={units} name="attributes.lineInsideDiameterMm" kind="smallLength" label="Line inside diameter" />
        <SelectField
          label="Line material"
          hint="Stainless is sized by its outside diameter"
          error={errors?.lineMaterial?.message}
          {...form.register('attributes.lineMaterial')}
        >
          <option value="">Not recorded (taken as vinyl)</option>
          <OptionList values={lineMaterials} labels={lineMaterialLabels} />
        </SelectField>
        <AmountField
          form={form}
          units={units}
          name="attributes.lineResistanceKpaPerM"
          kind={{ label: 'kPa/m' }}
          label="Line resistance"
          hint="Measured or the maker's figure; empty uses the line type's usual figure"
        />
        <AmountField
          form={form}
          units={units}
          name="attributes.riseM"
          kind="length"
          label="Rise, keg to faucet"
          hint="Negative when the faucet sits below the keg; optional"
        />
        <AmountField form={form} units={units} name="attributes.coldRoomTempC" kind="temperature" label="Cold room temperature" hint="Optional" />
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
        <AmountField form={form} units={units} name="attributes.sizeKg" kind="mass" label="Size" unitOf="CO2" />
        <AmountField form={form} units={units} name="attributes.fillPercent" kind={{ label: '%' }} label="Fill" />
        <InputField label="Hydrostatic test due" error={errors?.hydroTestDue?.message} type="date" {...form.register('attributes.hydroTestDue')} />
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

/**
 * What the add and edit forms share: code and name, the capacity of a kind that holds beer, the kind's own
 * details and the notes, with numbers in the person's units (each box converts what is typed to the API's unit).
 */
export const EquipmentRegistryFields = ({ kind, codeHint, ...props }: AttributeFieldsProps & { kind: EquipmentKind; codeHint?: string }) => {
  const { form, units } = props;
  const errors = form.formState.errors;
  return (
    <>
      <div className="grid gap-4 sm:grid-cols-2">
        <InputField label="Code" hint={codeHint} error={errors.code?.message} autoComplete="off" {...form.register('code')} />
        <InputField label="Name" error={errors.name?.message} autoComplete="off" {...form.register('name')} />
      </div>
      {kindHasCapacity(kind) ? <AmountField form={form} units={units} name="capacityLiters" kind="volume" label="Capacity" /> : null}
      <EquipmentAttributeFields kind={kind} {...props} />
      <InputField label="Notes" error={errors.notes?.message} {...form.register('notes')} />
    </>
  );
};
