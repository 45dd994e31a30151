import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import type { z } from 'zod';
import type { SessionUser } from '../../../../shared/schemas/auth.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { FieldSet, InputField } from '@/components/ui/field';
import { Radio } from '@/components/ui/input';
import { updateMeSchema, useUpdateMe } from '@/features/auth/api/update-me';
import { formatPressure, formatTemperature, formatVolume } from '@/lib/units';
import { applyProblemToForm } from '@/utils/problem-form';

/** The form always holds both fields; the API body (`updateMeSchema`) lets either be left out. */
const profileFormSchema = updateMeSchema.required();
type ProfileFormValues = z.infer<typeof profileFormSchema>;

const example = (units: SessionUser['units']) => `${formatVolume(19, units)}, ${formatTemperature(3, units)}, ${formatPressure(83, units)}`;

export interface ProfileFormProps {
  user: SessionUser;
}

export const ProfileForm = ({ user }: ProfileFormProps) => {
  const update = useUpdateMe();
  const [formError, setFormError] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    setError,
    reset,
    formState: { errors, isDirty },
  } = useForm<ProfileFormValues>({
    resolver: zodResolver(profileFormSchema),
    defaultValues: { name: user.name, units: user.units },
  });

  const onSubmit = handleSubmit((values) => {
    setFormError(null);
    const body: { name?: string; units?: SessionUser['units'] } = {};
    if (values.name !== user.name) body.name = values.name;
    if (values.units !== user.units) body.units = values.units;
    update.mutate(body, {
      onSuccess: ({ user: saved }) => reset({ name: saved.name, units: saved.units }),
      onError: (error) => {
        const rest = applyProblemToForm(error, setError, ['name', 'units']);
        if (rest.length) setFormError(rest.join(' '));
      },
    });
  });

  return (
    <form onSubmit={onSubmit} noValidate className="flex max-w-md flex-col gap-5">
      {formError ? <Alert tone="error">{formError}</Alert> : null}
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
      <div>
        <Button type="submit" pending={update.isPending} disabled={!isDirty}>
          Save
        </Button>
      </div>
    </form>
  );
};
