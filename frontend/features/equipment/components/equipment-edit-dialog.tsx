import { useMemo } from 'react';
import { useForm } from 'react-hook-form';
import type { z } from 'zod';
import { attributesSchemaByKind, equipmentKindLabels, updateEquipmentFieldsSchema, type Equipment } from '../../../../shared/schemas/equipment.ts';
import { FormFrame } from '@/components/form/form-frame';
import { useActionError } from '@/components/form/use-action-error';
import { FormDialog } from '@/components/ui/form-dialog';
import { useUpdateEquipment } from '@/features/equipment/api/update-equipment';
import { EquipmentRegistryFields } from '@/features/equipment/components/attribute-fields';
import { applyEquipmentProblem, equipmentResolver, formValuesOf, type EquipmentFormValues } from '@/features/equipment/equipment-form';
import { useUnits } from '@/hooks/use-units';

/** The shared PATCH fields, with the attributes held to the item's own kind. */
const editSchemaFor = (item: Equipment) => updateEquipmentFieldsSchema.extend({ attributes: attributesSchemaByKind[item.kind] });
type EditOutput = z.infer<ReturnType<typeof editSchemaFor>>;

export const EquipmentEditDialog = ({ item, open, onClose }: { item: Equipment; open: boolean; onClose: () => void }) => {
  const mutation = useUpdateEquipment(item.id);
  return (
    <FormDialog
      open={open}
      onClose={onClose}
      title={`Edit ${item.code}`}
      description={`${equipmentKindLabels[item.kind]}: registry details. The kind stays; states change through “Change state”.`}
    >
      <EditForm item={item} mutation={mutation} onDone={onClose} />
    </FormDialog>
  );
};

const EditForm = ({ item, mutation, onDone }: { item: Equipment; mutation: ReturnType<typeof useUpdateEquipment>; onDone: () => void }) => {
  const units = useUnits();
  const resolver = useMemo(() => equipmentResolver<EditOutput>(editSchemaFor(item)), [item]);
  const form = useForm<EquipmentFormValues, unknown, EditOutput>({ resolver, defaultValues: formValuesOf(item) });
  const { error, run } = useActionError();
  const onSubmit = form.handleSubmit((values) =>
    run(async () => {
      try {
        await mutation.mutateAsync(values);
        onDone();
      } catch (problem) {
        return applyEquipmentProblem(problem, form.setError).join(' ');
      }
    }),
  );
  return (
    <FormFrame onSubmit={onSubmit} error={error} pending={mutation.isPending} submitLabel="Save">
      <EquipmentRegistryFields kind={item.kind} form={form} units={units.units} />
    </FormFrame>
  );
};
