import type { FieldValues, Path } from 'react-hook-form';
import { minPasswordLength } from '../../../../shared/schemas/auth.ts';
import { TextField, type AnyForm } from '@/components/form/bound-fields';

/** A form that sets a password: the password and its repetition. */
interface NewPasswordValues extends FieldValues {
  password: string;
  confirmPassword: string;
}

/** "New password" and "Repeat the password", for the reset and invitation forms. */
export const NewPasswordFields = <T extends NewPasswordValues>({ form }: { form: AnyForm<T> }) => (
  <>
    <TextField
      form={form}
      name={'password' as Path<T>}
      kind="password"
      label="New password"
      hint={`At least ${minPasswordLength} characters. A few unrelated words make a good one.`}
      autoComplete="new-password"
    />
    <TextField form={form} name={'confirmPassword' as Path<T>} kind="password" label="Repeat the password" autoComplete="new-password" />
  </>
);
