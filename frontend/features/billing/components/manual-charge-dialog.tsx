import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import type { ManualChargeInput } from '../../../../shared/schemas/billing.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Dialog, DialogActions } from '@/components/ui/dialog';
import { Field } from '@/components/ui/field';
import { Checkbox, Input, Select } from '@/components/ui/input';
import { manualChargeInputSchema, useAddManualCharge, useBillableMembers } from '@/features/billing/api/manual-charges';
import { parseMoneyInput } from '@/features/billing/utils/money-input';
import { applyProblemToForm } from '@/utils/problem-form';

interface Props {
  open: boolean;
  period: string;
  currency: string;
  onClose: () => void;
}

const ChargeForm = ({ period, currency, onClose }: Omit<Props, 'open'>) => {
  const add = useAddManualCharge();
  const members = useBillableMembers();
  const [formError, setFormError] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm<ManualChargeInput>({
    resolver: zodResolver(manualChargeInputSchema),
    defaultValues: { memberId: '', period, description: '', reason: '', taxable: true },
  });
  const submit = handleSubmit((values) => {
    setFormError(null);
    add.mutate(values, {
      onSuccess: onClose,
      onError: (e) => {
        const rest = applyProblemToForm(e, setError, ['memberId', 'period', 'description', 'reason', 'amountCents', 'taxable']);
        if (rest.length) setFormError(rest.join(' '));
      },
    });
  });
  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-4">
      {formError ? <Alert tone="error">{formError}</Alert> : null}
      <Field label="Member" error={errors.memberId?.message}>
        {({ invalid, ...c }) => (
          <Select {...c} invalid={invalid} autoFocus {...register('memberId')}>
            <option value="">Pick a member…</option>
            {(members.data ?? []).map((m) => (
              <option key={m.id} value={m.id}>
                {m.name}
              </option>
            ))}
          </Select>
        )}
      </Field>
      <Field label="Period" hint="Goes on the member's invoice for this month (straight onto it if that is still a draft)." error={errors.period?.message}>
        {({ invalid, ...c }) => <Input {...c} invalid={invalid} type="month" {...register('period')} />}
      </Field>
      <Field label="What the invoice says" error={errors.description?.message}>
        {({ invalid, ...c }) => <Input {...c} invalid={invalid} autoComplete="off" {...register('description')} />}
      </Field>
      <Field label="Reason" hint="Why it is charged or credited; kept with the charge and shown as its source." error={errors.reason?.message}>
        {({ invalid, ...c }) => <Input {...c} invalid={invalid} autoComplete="off" {...register('reason')} />}
      </Field>
      <Field label="Amount before tax" hint={`In ${currency}. A minus sign makes it a credit, e.g. -5.00.`} error={errors.amountCents?.message}>
        {({ invalid, ...c }) => <Input {...c} invalid={invalid} inputMode="decimal" {...register('amountCents', { setValueAs: parseMoneyInput })} />}
      </Field>
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
