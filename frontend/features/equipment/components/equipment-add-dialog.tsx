import { useEffect, useMemo, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import {
  createEquipmentSchema,
  equipmentKindLabels,
  equipmentKinds,
  equipmentKindSchema,
  type CreateEquipmentInput,
  type Equipment,
} from '../../../../shared/schemas/equipment.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
import { Field } from '@/components/ui/field';
import { Input, Select } from '@/components/ui/input';
import { useCreateEquipment, useNextEquipmentCode } from '@/features/equipment/api/create-equipment';
import { EquipmentAttributeFields } from '@/features/equipment/components/attribute-fields';
import { applyEquipmentProblem, defaultAttributes, equipmentResolver, kindHasCapacity, type EquipmentFormValues } from '@/features/equipment/equipment-form';
import { useUnits } from '@/hooks/use-units';

/** The admin adds a fermenter, keg, tap position or CO2 cylinder to the registry. */
export const EquipmentAddDialog = ({ open, onClose, onCreated }: { open: boolean; onClose: () => void; onCreated: (item: Equipment) => void }) => {
  const mutation = useCreateEquipment();
  return (
    <Dialog
      open={open}
      onClose={onClose}
      busy={mutation.isPending}
      title="Add equipment"
      description="Pick the kind first: the code, the fields and the units follow it. New items start as “Needs cleaning”."
    >
      <AddForm
        mutation={mutation}
        onDone={(item) => {
          onCreated(item);
          onClose();
        }}
      />
    </Dialog>
  );
};

const AddForm = ({ mutation, onDone }: { mutation: ReturnType<typeof useCreateEquipment>; onDone: (item: Equipment) => void }) => {
  const units = useUnits();
  const resolver = useMemo(() => equipmentResolver<CreateEquipmentInput>(createEquipmentSchema, units.units), [units.units]);
  const [message, setMessage] = useState<string[]>([]);
  const form = useForm<EquipmentFormValues, unknown, CreateEquipmentInput>({
    resolver,
    defaultValues: { kind: 'fermenter', code: '', name: '', capacityLiters: null, notes: '', attributes: defaultAttributes.fermenter },
  });
  const kind = form.watch('kind');
  const nextCode = useNextEquipmentCode(kind);
  // The suggested code fills the box until the admin types their own.
  const suggested = useRef('');
  useEffect(() => {
    const code = nextCode.data?.kind === kind ? nextCode.data.code : undefined;
    if (!code) return;
    const current = form.getValues('code');
    if (current === '' || current === suggested.current) form.setValue('code', code, { shouldDirty: true });
    suggested.current = code;
  }, [nextCode.data, kind, form]);

  const onSubmit = form.handleSubmit(async (values) => {
    setMessage([]);
    try {
      const { equipment } = await mutation.mutateAsync(values);
      onDone(equipment);
    } catch (error) {
      setMessage(applyEquipmentProblem(error, form.setError));
    }
  });
  const errors = form.formState.errors;
  const kindField = form.register('kind');
  return (
    <form onSubmit={onSubmit} className="flex flex-col gap-4" noValidate>
      {message.length ? <Alert tone="error">{message.join(' ')}</Alert> : null}
      <Field label="Kind" error={errors.kind?.message}>
        {(c) => (
          <Select
            {...c}
            {...kindField}
            onChange={(event) => {
              const next = equipmentKindSchema.safeParse(event.target.value);
              if (!next.success) return;
              void kindField.onChange(event);
              form.setValue('attributes', { ...defaultAttributes[next.data] });
              if (!kindHasCapacity(next.data)) form.setValue('capacityLiters', null);
              form.clearErrors();
            }}
          >
            {equipmentKinds.map((k) => (
              <option key={k} value={k}>
                {equipmentKindLabels[k]}
              </option>
            ))}
          </Select>
        )}
      </Field>
      <div className="grid gap-4 sm:grid-cols-2">
        <Field
          label="Code"
          hint={nextCode.data?.kind === kind ? `Next free: ${nextCode.data.code}` : 'Letter, dash, number — as on the label'}
          error={errors.code?.message}
        >
          {(c) => <Input {...c} autoComplete="off" {...form.register('code')} />}
        </Field>
        <Field label="Name" error={errors.name?.message}>
          {(c) => <Input {...c} autoComplete="off" {...form.register('name')} />}
        </Field>
      </div>
      {kindHasCapacity(kind) ? (
        <Field label={`Capacity (${units.labels.volume})`} error={errors.capacityLiters?.message}>
          {(c) => (
            <Input
              {...c}
              type="number"
              step="any"
              inputMode="decimal"
              {...form.register('capacityLiters', { setValueAs: (v: unknown) => (v === '' || v === null || v === undefined ? null : Number(v)) })}
            />
          )}
        </Field>
      ) : null}
      <EquipmentAttributeFields kind={kind} form={form} units={units.units} />
      <Field label="Notes" error={errors.notes?.message}>
        {(c) => <Input {...c} {...form.register('notes')} />}
      </Field>
      <div className="flex justify-end">
        <Button type="submit" pending={mutation.isPending}>
          Add to the registry
        </Button>
      </div>
    </form>
  );
};
