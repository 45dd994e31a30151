import { z } from 'zod';
import { passwordSchema } from '../../../../shared/schemas/auth.ts';

/** The two password boxes of the reset and invitation forms; the repeat never leaves the browser. */
export const newPasswordFields = {
  password: passwordSchema,
  confirmPassword: z.string().min(1, 'Type the password again'),
};

export function passwordsMatch(values: { password: string; confirmPassword: string }) {
  return values.password === values.confirmPassword;
}

export const passwordsMatchIssue = { message: "The two passwords don't match", path: ['confirmPassword'] };
