import {
  equipmentStateChangeSchema,
  vesselStateLabels,
  vesselStates,
  type Equipment,
  type EquipmentStateChangeInput,
} from '../../../../shared/schemas/equipment.ts';
import { ChoiceField, OptionList, TextField } from '@/components/form/bound-fields';
import { FormFrame } from '@/components/form/form-frame';
import { useApiForm } from '@/components/form/use-api-form';
import { FormDialog } from '@/components/ui/form-dialog';
import { useChangeEquipmentState } from '@/features/equipment/api/change-equipment-state';

export interface StateChangeDialogProps {
  item: Equipment | null;
  onClose: () => void;
}

/** The brewer on duty sets an item's state and says why; it lands in the item's history. */
export const StateChangeDialog = ({ item, onClose }: StateChangeDialogProps) => (
  <FormDialog
    open={Boolean(item)}
    onClose={onClose}
    title={item ? `Change the state of ${item.code}` : ''}
    description="Every change is kept in the item's history with who, when and why."
  >
    {item ? <StateChangeForm item={item} onDone={onClose} /> : null}
  </FormDialog>
);

const StateChangeForm = ({ item, onDone }: { item: Equipment; onDone: () => void }) => {
  const mutation = useChangeEquipmentState(item.id);
  const { form, message, showProblem, submit } = useApiForm<EquipmentStateChangeInput>(equipmentStateChangeSchema, {
    defaultValues: { state: vesselStates.find((s) => s !== item.state) ?? 'ready', reason: '' },
    fields: ['state', 'reason'],
  });
  const onSubmit = submit((values) => mutation.mutateAsync(values).then(onDone, showProblem));
  return (
    <FormFrame onSubmit={onSubmit} message={message} pending={mutation.isPending} submitLabel="Save state">
      <p className="text-sm text-ink-muted">Now: {vesselStateLabels[item.state]}</p>
      <ChoiceField form={form} name="state" label="New state">
        <OptionList values={vesselStates} labels={vesselStateLabels} disabled={(s) => s === item.state} />
      </ChoiceField>
      <TextField
        form={form}
        name="reason"
        label="Why"
        hint="For example: “Soaked in alkaline cleaner and rinsed” or “Relief valve sticks”."
        autoComplete="off"
      />
    </FormFrame>
  );
};
