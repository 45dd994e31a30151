import { useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import type { z } from 'zod';
import { attributesSchemaByKind, equipmentKindLabels, updateEquipmentFieldsSchema, type Equipment } from '../../../../shared/schemas/equipment.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
import { Field } from '@/components/ui/field';
import { Input } from '@/components/ui/input';
import { useUpdateEquipment } from '@/features/equipment/api/update-equipment';
import { EquipmentAttributeFields } from '@/features/equipment/components/attribute-fields';
import { applyEquipmentProblem, equipmentResolver, formValuesOf, kindHasCapacity, type EquipmentFormValues } from '@/features/equipment/equipment-form';
import { useUnits } from '@/hooks/use-units';

/** The shared PATCH fields, with the attributes held to the item's own kind. */
const editSchemaFor = (item: Equipment) => updateEquipmentFieldsSchema.extend({ attributes: attributesSchemaByKind[item.kind] });
type EditOutput = z.infer<ReturnType<typeof editSchemaFor>>;

export const EquipmentEditDialog = ({ item, open, onClose }: { item: Equipment; open: boolean; onClose: () => void }) => {
  const mutation = useUpdateEquipment(item.id);
  return (
    <Dialog
      open={open}
      onClose={onClose}
      busy={mutation.isPending}
      title={`Edit ${item.code}`}
      description={`${equipmentKindLabels[item.kind]}: registry details. The kind stays; states change through “Change state”.`}
    >
      <EditForm item={item} mutation={mutation} onDone={onClose} />
    </Dialog>
  );
};

const EditForm = ({ item, mutation, onDone }: { item: Equipment; mutation: ReturnType<typeof useUpdateEquipment>; onDone: () => void }) => {
  const units = useUnits();
  const resolver = useMemo(() => equipmentResolver<EditOutput>(editSchemaFor(item), units.units, item), [item, units.units]);
  const [message, setMessage] = useState<string[]>([]);
  const form = useForm<EquipmentFormValues, unknown, EditOutput>({ resolver, defaultValues: formValuesOf(item, units.units) });
  const onSubmit = form.handleSubmit(async (values) => {
    setMessage([]);
    try {
      await mutation.mutateAsync(values);
      onDone();
    } catch (error) {
      setMessage(applyEquipmentProblem(error, form.setError));
    }
  });
  const errors = form.formState.errors;
  return (
    <form onSubmit={onSubmit} className="flex flex-col gap-4" noValidate>
      {message.length ? <Alert tone="error">{message.join(' ')}</Alert> : null}
      <div className="grid gap-4 sm:grid-cols-2">
        <Field label="Code" error={errors.code?.message}>
          {(c) => <Input {...c} autoComplete="off" {...form.register('code')} />}
        </Field>
        <Field label="Name" error={errors.name?.message}>
          {(c) => <Input {...c} autoComplete="off" {...form.register('name')} />}
        </Field>
      </div>
      {kindHasCapacity(item.kind) ? (
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
      <EquipmentAttributeFields kind={item.kind} form={form} units={units.units} />
      <Field label="Notes" error={errors.notes?.message}>
        {(c) => <Input {...c} {...form.register('notes')} />}
      </Field>
      <div className="flex justify-end">
        <Button type="submit" pending={mutation.isPending}>
          Save
        </Button>
      </div>
    </form>
  );
};
