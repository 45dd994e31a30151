import { z } from 'zod';
import type { BillingProfile } from '../../../../shared/schemas/billing.ts';
import { TextAreaField, TextField } from '@/components/form/bound-fields';
import { FormFrame } from '@/components/form/form-frame';
import { NumberField } from '@/components/form/number-field';
import { useApiForm } from '@/components/form/use-api-form';
import { billingProfileSchema, useSaveBillingProfile } from '@/features/billing/api/price-list';

/** The address as typed, one line per row: the lines that are not blank. */
const linesOf = (address: string) =>
  address
    .split('\n')
    .map((l) => l.trim())
    .filter(Boolean);

/** The form holds the address as one text; it is checked as the profile's lines, and its problems stand beside it. */
const profileFormSchema = billingProfileSchema.omit({ addressLines: true }).extend({
  address: z.string().superRefine((address, ctx) => {
    const lines = billingProfileSchema.shape.addressLines.safeParse(linesOf(address));
    if (!lines.success) ctx.addIssue({ code: 'custom', message: lines.error.issues[0]?.message ?? 'Enter the address' });
  }),
});
type ProfileForm = z.infer<typeof profileFormSchema>;

/** The invoice's header and "how to pay": the co-op's name and address, terms, the bank account. */
export const BillingProfileForm = ({ profile }: { profile: BillingProfile }) => {
  const save = useSaveBillingProfile();
  const { form, setMessage, frame } = useApiForm<ProfileForm>(profileFormSchema, {
    defaultValues: { ...profile, address: profile.addressLines.join('\n') },
    fields: ['coopName', 'email', 'currency', 'paymentTermsDays', 'bankAccountName', 'bankAccount', 'paymentNote'],
  });
  const send = async ({ address, ...rest }: ProfileForm) => {
    await save.mutateAsync({ ...rest, addressLines: linesOf(address) });
    setMessage({ tone: 'success', text: 'Saved. New PDFs and e-mails use it.' });
  };
  return (
    <FormFrame {...frame(send, save.isPending)} submitLabel="Save" panel className="max-w-3xl">
      <div className="grid gap-3 sm:grid-cols-2">
        <TextField form={form} name="coopName" label="Co-op name" />
        <TextField form={form} name="email" label="Billing e-mail" type="email" />
        <TextAreaField form={form} name="address" label="Address" hint="One line per row" rows={4} className="sm:row-span-2" />
        <TextField form={form} name="currency" label="Currency" hint="Three letters, e.g. EUR" inputClassName="w-28 uppercase" />
        <NumberField form={form} name="paymentTermsDays" label="Days to pay" inputMode="numeric" inputClassName="w-28" />
        <TextField form={form} name="bankAccountName" label="Account holder" />
        <TextField form={form} name="bankAccount" label="Account number" />
      </div>
      <TextField form={form} name="paymentNote" label="Note under “How to pay”" />
    </FormFrame>
  );
};
