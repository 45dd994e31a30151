import type { UseFormRegisterReturn } from 'react-hook-form';
import { minPasswordLength } from '../../../../shared/schemas/auth.ts';
import { Field } from '@/components/ui/field';
import { PasswordInput } from '@/components/ui/input';

export interface NewPasswordFieldsProps {
  password: UseFormRegisterReturn;
  confirmPassword: UseFormRegisterReturn;
  passwordError?: string | undefined;
  confirmPasswordError?: string | undefined;
}

/** "New password" and "Repeat the password", for the reset and invitation forms. */
export const NewPasswordFields = ({ password, confirmPassword, passwordError, confirmPasswordError }: NewPasswordFieldsProps) => (
  <>
    <Field label="New password" hint={`At least ${minPasswordLength} characters. A few unrelated words make a good one.`} error={passwordError}>
      {({ invalid, ...control }) => <PasswordInput {...control} invalid={invalid} autoComplete="new-password" {...password} />}
    </Field>
    <Field label="Repeat the password" error={confirmPasswordError}>
      {({ invalid, ...control }) => <PasswordInput {...control} invalid={invalid} autoComplete="new-password" {...confirmPassword} />}
    </Field>
  </>
);
