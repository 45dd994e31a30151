import type { UseFormRegisterReturn } from 'react-hook-form';
import { minPasswordLength } from '../../../../shared/schemas/auth.ts';
import { PasswordField } from '@/components/ui/field';

export interface NewPasswordFieldsProps {
  password: UseFormRegisterReturn;
  confirmPassword: UseFormRegisterReturn;
  passwordError?: string | undefined;
  confirmPasswordError?: string | undefined;
}

/** "New password" and "Repeat the password", for the reset and invitation forms. */
export const NewPasswordFields = ({ password, confirmPassword, passwordError, confirmPasswordError }: NewPasswordFieldsProps) => (
  <>
    <PasswordField
      label="New password"
      hint={`At least ${minPasswordLength} characters. A few unrelated words make a good one.`}
      error={passwordError}
      autoComplete="new-password"
      {...password}
    />
    <PasswordField label="Repeat the password" error={confirmPasswordError} autoComplete="new-password" {...confirmPassword} />
  </>
);
