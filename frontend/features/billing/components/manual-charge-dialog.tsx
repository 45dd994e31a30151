import type { ManualChargeInput } from '../../../../shared/schemas/billing.ts';
import { useApiForm } from '@/components/form/use-api-form';
import { Button } from '@/components/ui/button';
import { Dialog, DialogActions } from '@/components/ui/dialog';
import { FormMessageAlert, InputField, SelectField } from '@/components/ui/field';
import { Checkbox } from '@/components/ui/input';
import { manualChargeInputSchema, useAddManualCharge, useBillableMembers } from '@/features/billing/api/manual-charges';
import { parseMoneyInput } from '@/features/billing/utils/money-input';

interface Props {
  open: boolean;
  period: string;
  currency: string;
  onClose: () => void;
}

const ChargeForm = ({ period, currency, onClose }: Omit<Props, 'open'>) => {
  const add = useAddManualCharge();
  const members = useBillableMembers();
  const {
    form,
    message,
    showProblem,
    submit: submitted,
  } = useApiForm<ManualChargeInput>(manualChargeInputSchema, {
    defaultValues: { memberId: '', period, description: '', reason: '', taxable: true },
    fields: ['memberId', 'period', 'description', 'reason', 'amountCents', 'taxable'],
  });
  const {
    register,
    formState: { errors },
  } = form;
  const submit = submitted((values) => {
    add.mutate(values, {
      onSuccess: onClose,
      onError: (e) => {
        showProblem(e);
      },
    });
  });
  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-4">
      <FormMessageAlert message={message} />
      <SelectField label="Member" error={errors.memberId?.message} autoFocus {...register('memberId')}>
        <option value="">Pick a member…</option>
        {(members.data ?? []).map((m) => (
          <option key={m.id} value={m.id}>
            {m.name}
          </option>
        ))}
      </SelectField>
      <InputField
        label="Period"
        hint="Goes on the member's invoice for this month (straight onto it if that is still a draft)."
        error={errors.period?.message}
        type="month"
        {...register('period')}
      />
      <InputField label="What the invoice says" error={errors.description?.message} autoComplete="off" {...register('description')} />
      <InputField
        label="Reason"
        hint="Why it is charged or credited; kept with the charge and shown as its source."
        error={errors.reason?.message}
        autoComplete="off"
        {...register('reason')}
      />
      <InputField
        label="Amount before tax"
        hint={`In ${currency}. A minus sign makes it a credit, e.g. -5.00.`}
        error={errors.amountCents?.message}
        inputMode="decimal"
        {...register('amountCents', { setValueAs: parseMoneyInput })}
      />
      <Checkbox label="Add tax at the period's rate" {...register('taxable')} />
      <DialogActions>
        <Button variant="secondary" onClick={onClose} disabled={add.isPending}>
          Cancel
        </Button>
        <Button type="submit" pending={add.isPending}>
          Add
        </Button>
      </DialogActions>
    </form>
  );
};

export const ManualChargeDialog = ({ open, ...props }: Props) => (
  <Dialog
    open={open}
    onClose={props.onClose}
    title="Add a charge or credit"
    description="For what no record covers: a part supplied, a fee waived, a correction."
  >
    <ChargeForm {...props} />
  </Dialog>
);
