import {
  equipmentStateChangeSchema,
  vesselStateLabels,
  vesselStates,
  type Equipment,
  type EquipmentStateChangeInput,
} from '../../../../shared/schemas/equipment.ts';
import { FormFrame } from '@/components/form/form-frame';
import { useApiForm } from '@/components/form/use-api-form';
import { Dialog } from '@/components/ui/dialog';
import { InputField, SelectField } from '@/components/ui/field';
import { useChangeEquipmentState } from '@/features/equipment/api/change-equipment-state';

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
  const { form, message, showProblem, submit } = useApiForm<EquipmentStateChangeInput>(equipmentStateChangeSchema, {
    defaultValues: { state: vesselStates.find((s) => s !== item.state) ?? 'ready', reason: '' },
    fields: ['state', 'reason'],
  });
  const onSubmit = submit((values) => mutation.mutateAsync(values).then(onDone, showProblem));
  const errors = form.formState.errors;
  return (
    <FormFrame onSubmit={onSubmit} message={message} pending={mutation.isPending} submitLabel="Save state">
      <p className="text-sm text-ink-muted">Now: {vesselStateLabels[item.state]}</p>
      <SelectField label="New state" error={errors.state?.message} {...form.register('state')}>
        {vesselStates.map((s) => (
          <option key={s} value={s} disabled={s === item.state}>
            {vesselStateLabels[s]}
          </option>
        ))}
      </SelectField>
      <InputField
        label="Why"
        hint="For example: “Soaked in alkaline cleaner and rinsed” or “Relief valve sticks”."
        error={errors.reason?.message}
        {...form.register('reason')}
        autoComplete="off"
      />
    </FormFrame>
  );
};
