import { useState } from 'react';
import { useForm } from 'react-hook-form';
import type { BillingProfile } from '../../../../shared/schemas/billing.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Field, InputField } from '@/components/ui/field';
import { Input } from '@/components/ui/input';
import { billingProfileSchema, useSaveBillingProfile } from '@/features/billing/api/price-list';
import { applyProblemToForm } from '@/utils/problem-form';

type ProfileForm = Omit<BillingProfile, 'addressLines'> & { address: string };

/** The invoice's header and "how to pay": the co-op's name and address, terms, the bank account. */
export const BillingProfileForm = ({ profile }: { profile: BillingProfile }) => {
  const save = useSaveBillingProfile();
  const [saved, setSaved] = useState(false);
  const [formError, setFormError] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm<ProfileForm>({
    defaultValues: { ...profile, address: profile.addressLines.join('\n') },
    resolver: (values) => {
      const parsed = billingProfileSchema.safeParse({
        ...values,
        paymentTermsDays: Number(values.paymentTermsDays),
        addressLines: values.address
          .split('\n')
          .map((l) => l.trim())
          .filter(Boolean),
      });
      if (parsed.success) return { values: { ...values }, errors: {} };
      const errs: Record<string, { type: string; message: string }> = {};
      for (const issue of parsed.error.issues) {
        const key = issue.path[0] === 'addressLines' ? 'address' : String(issue.path[0]);
        errs[key] ??= { type: 'validation', message: issue.message };
      }
      return { values: {}, errors: errs };
    },
  });
  const submit = handleSubmit((values) => {
    setSaved(false);
    setFormError(null);
    const { address, ...rest } = values;
    save.mutate(
      {
        ...rest,
        paymentTermsDays: Number(rest.paymentTermsDays),
        addressLines: address
          .split('\n')
          .map((l) => l.trim())
          .filter(Boolean),
      },
      {
        onSuccess: () => setSaved(true),
        onError: (e) => {
          const left = applyProblemToForm(e, setError, ['coopName', 'email', 'currency', 'paymentTermsDays', 'bankAccountName', 'bankAccount', 'paymentNote']);
          if (left.length) setFormError(left.join(' '));
        },
      },
    );
  });
  return (
    <form onSubmit={submit} noValidate className="flex max-w-3xl flex-col gap-3 rounded-md border border-line bg-surface p-4">
      {formError ? <Alert tone="error">{formError}</Alert> : null}
      {saved ? <Alert tone="success">Saved. New PDFs and e-mails use it.</Alert> : null}
      <div className="grid gap-3 sm:grid-cols-2">
        <InputField label="Co-op name" error={errors.coopName?.message} {...register('coopName')} />
        <InputField label="Billing e-mail" error={errors.email?.message} type="email" {...register('email')} />
        <Field label="Address" hint="One line per row" error={errors.address?.message} className="sm:row-span-2">
          {({ invalid, ...c }) => (
            <textarea
              {...c}
              rows={4}
              className="block w-full rounded-md border border-line-strong bg-surface px-3 py-2 text-sm"
              aria-invalid={invalid || undefined}
              {...register('address')}
            />
          )}
        </Field>
        <InputField
          label="Currency"
          hint="Three letters, e.g. EUR"
          error={errors.currency?.message}
          inputClassName="w-28 uppercase"
          {...register('currency')}
        />
        <Field label="Days to pay" error={errors.paymentTermsDays?.message}>
          {({ invalid, ...c }) => (
            <Input {...c} invalid={invalid} type="number" min={0} className="w-28" {...register('paymentTermsDays', { valueAsNumber: true })} />
          )}
        </Field>
        <InputField label="Account holder" error={errors.bankAccountName?.message} {...register('bankAccountName')} />
        <InputField label="Account number" error={errors.bankAccount?.message} {...register('bankAccount')} />
      </div>
      <InputField label="Note under “How to pay”" error={errors.paymentNote?.message} {...register('paymentNote')} />
      <div>
        <Button type="submit" pending={save.isPending}>
          Save
        </Button>
      </div>
    </form>
  );
};
