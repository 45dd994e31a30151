import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import {
  equipmentStateChangeSchema,
  vesselStateLabels,
  vesselStates,
  type Equipment,
  type EquipmentStateChangeInput,
} from '../../../../shared/schemas/equipment.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
import { Field } from '@/components/ui/field';
import { Input, Select } from '@/components/ui/input';
import { useChangeEquipmentState } from '@/features/equipment/api/change-equipment-state';
import { applyProblemToForm } from '@/utils/problem-form';
import { useState } from 'react';

export interface StateChangeDialogProps {
  item: Equipment | null;
  onClose: () => void;
}

/** The brewer on duty sets an item's state and says why; it lands in the item's history. */
export const StateChangeDialog = ({ item, onClose }: StateChangeDialogProps) => (
  <Dialog
    open={Boolean(item)}
    onClose={onClose}
    title={item ? `Change the state of ${item.code}` : ''}
    description="Every change is kept in the item's history with who, when and why."
  >
    {item ? <StateChangeForm item={item} onDone={onClose} /> : null}
  </Dialog>
);

const StateChangeForm = ({ item, onDone }: { item: Equipment; onDone: () => void }) => {
  const mutation = useChangeEquipmentState(item.id);
  const [message, setMessage] = useState<string[]>([]);
  const form = useForm<EquipmentStateChangeInput>({
    resolver: zodResolver(equipmentStateChangeSchema),
    defaultValues: { state: vesselStates.find((s) => s !== item.state) ?? 'ready', reason: '' },
  });
  const onSubmit = form.handleSubmit(async (values) => {
    setMessage([]);
    try {
      await mutation.mutateAsync(values);
      onDone();
    } catch (error) {
      setMessage(applyProblemToForm(error, form.setError, ['state', 'reason']));
    }
  });
  return (
    <form onSubmit={onSubmit} className="flex flex-col gap-4" noValidate>
      {message.length ? <Alert tone="error">{message.join(' ')}</Alert> : null}
      <p className="text-sm text-ink-muted">Now: {vesselStateLabels[item.state]}</p>
      <Field label="New state" error={form.formState.errors.state?.message}>
        {(c) => (
          <Select {...c} {...form.register('state')}>
            {vesselStates.map((s) => (
              <option key={s} value={s} disabled={s === item.state}>
                {vesselStateLabels[s]}
              </option>
            ))}
          </Select>
        )}
      </Field>
      <Field label="Why" hint="For example: “Soaked in alkaline cleaner and rinsed” or “Relief valve sticks”." error={form.formState.errors.reason?.message}>
        {(c) => <Input {...c} {...form.register('reason')} autoComplete="off" />}
      </Field>
      <div className="flex justify-end gap-2">
        <Button type="submit" pending={mutation.isPending}>
          Save state
        </Button>
      </div>
    </form>
  );
};
