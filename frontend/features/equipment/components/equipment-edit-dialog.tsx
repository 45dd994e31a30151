import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { updateEquipmentFieldsSchema, type Equipment } from '../../../../shared/schemas/equipment.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
import { Field } from '@/components/ui/field';
import { Input } from '@/components/ui/input';
import { useUpdateEquipment } from '@/features/equipment/api/update-equipment';
import { applyProblemToForm } from '@/utils/problem-form';

/** The admin's edit of an item's registry details (the shared PATCH schema, attributes aside). */
const editSchema = updateEquipmentFieldsSchema.pick({ code: true, name: true, notes: true }).extend({
  code: z.string().trim().toUpperCase().regex(/^[A-Z]{1,3}-\d{1,4}$/, 'Use a code like F-07 or K-031'),
  capacityLiters: z.number().positive('More than 0 L').max(100_000).nullable(),
});
type EditValues = z.infer<typeof editSchema>;

export const EquipmentEditDialog = ({ item, open, onClose }: { item: Equipment; open: boolean; onClose: () => void }) => (
  <Dialog open={open} onClose={onClose} title={`Edit ${item.code}`} description="Registry details. States change through “Change state”.">
    <EditForm item={item} onDone={onClose} />
  </Dialog>
);

const EditForm = ({ item, onDone }: { item: Equipment; onDone: () => void }) => {
  const mutation = useUpdateEquipment(item.id);
  const [message, setMessage] = useState<string[]>([]);
  const form = useForm<EditValues>({
    resolver: zodResolver(editSchema),
    defaultValues: { code: item.code, name: item.name, notes: item.notes, capacityLiters: item.capacityLiters },
  });
  const onSubmit = form.handleSubmit(async (values) => {
    setMessage([]);
    try {
      await mutation.mutateAsync(values);
      onDone();
    } catch (error) {
      setMessage(applyProblemToForm(error, form.setError, ['code', 'name', 'notes', 'capacityLiters']));
    }
  });
  const errors = form.formState.errors;
  return (
    <form onSubmit={onSubmit} className="flex flex-col gap-4" noValidate>
      {message.length ? <Alert tone="error">{message.join(' ')}</Alert> : null}
      <Field label="Code" error={errors.code?.message}>
        {(c) => <Input {...c} {...form.register('code')} />}
      </Field>
      <Field label="Name" error={errors.name?.message}>
        {(c) => <Input {...c} {...form.register('name')} />}
      </Field>
      <Field label="Capacity (L)" error={errors.capacityLiters?.message}>
        {(c) => (
          <Input
            {...c}
            type="number"
            step="0.5"
            {...form.register('capacityLiters', { setValueAs: (v: string) => (v === '' || v === null ? null : Number(v)) })}
          />
        )}
      </Field>
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
