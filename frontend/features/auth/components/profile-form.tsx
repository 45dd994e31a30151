import type { z } from 'zod';
import type { SessionUser } from '../../../../shared/schemas/auth.ts';
import { FormFrame } from '@/components/form/form-frame';
import { useApiForm } from '@/components/form/use-api-form';
import { Alert } from '@/components/ui/alert';
import { FieldSet, InputField } from '@/components/ui/field';
import { Radio } from '@/components/ui/input';
import { updateMeSchema, useUpdateMe } from '@/features/auth/api/update-me';
import { formatPressure, formatTemperature, formatVolume } from '@/lib/units';

/** The form always holds both fields; the API body (`updateMeSchema`) lets either be left out. */
const profileFormSchema = updateMeSchema.required();
type ProfileFormValues = z.infer<typeof profileFormSchema>;

const example = (units: SessionUser['units']) => `${formatVolume(19, units)}, ${formatTemperature(3, units)}, ${formatPressure(83, units)}`;

export interface ProfileFormProps {
  user: SessionUser;
}

export const ProfileForm = ({ user }: ProfileFormProps) => {
  const update = useUpdateMe();
  const { form, frame } = useApiForm<ProfileFormValues>(profileFormSchema, {
    defaultValues: { name: user.name, units: user.units },
    fields: ['name', 'units'],
  });
  const { register } = form;
  const { errors, isDirty } = form.formState;

  const send = async (values: ProfileFormValues) => {
    const body: { name?: string; units?: SessionUser['units'] } = {};
    if (values.name !== user.name) body.name = values.name;
    if (values.units !== user.units) body.units = values.units;
    const { user: saved } = await update.mutateAsync(body);
    form.reset({ name: saved.name, units: saved.units });
  };

  return (
    <FormFrame {...frame(send, update.isPending)} submitLabel="Save" submitDisabled={!isDirty} actions="start" className="flex max-w-md flex-col gap-5">
      {update.isSuccess && !isDirty ? <Alert tone="success">Saved.</Alert> : null}
      <InputField label="Name" error={errors.name?.message} autoComplete="name" {...register('name')} />
      <FieldSet
        legend="Units"
        hint="How volumes, temperatures and pressures are shown to you. Records are kept the same either way."
        error={errors.units?.message}
      >
        <Radio value="metric" label="Metric" description={example('metric')} {...register('units')} />
        <Radio value="us" label="US" description={example('us')} {...register('units')} />
      </FieldSet>
    </FormFrame>
  );
};
