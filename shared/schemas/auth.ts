import { z } from 'zod';
import { emailSchema, personNameSchema, personSchema, unitSystemSchema } from './user.ts';

export const minPasswordLength = 10;

export const passwordSchema = z
  .string()
  .min(minPasswordLength, `Use at least ${minPasswordLength} characters`)
  .max(256, 'Keep the password under 256 characters');

/** Body of `POST /api/auth/login`. Any stored password is accepted here; length rules apply when setting one. */
export const loginSchema = z.object({
  email: emailSchema,
  password: z.string().min(1, 'Enter your password').max(256, 'Keep the password under 256 characters'),
});
export type LoginInput = z.infer<typeof loginSchema>;

/** The signed-in person, as `/api/auth/login`, `/api/auth/me` and the invitation accept return them. */
export const sessionUserSchema = personSchema.extend({
  units: unitSystemSchema,
});
export type SessionUser = z.infer<typeof sessionUserSchema>;

/** Body of `PATCH /api/auth/me`. */
export const updateMeSchema = z.object({
  name: personNameSchema.optional(),
  units: unitSystemSchema.optional(),
});
export type UpdateMeInput = z.infer<typeof updateMeSchema>;

/** Body of `POST /api/auth/password-reset`. */
export const passwordResetRequestSchema = z.object({ email: emailSchema });
export type PasswordResetRequestInput = z.infer<typeof passwordResetRequestSchema>;

export const tokenSchema = z.string().trim().min(1, 'The link has no token').max(512);

/** Body of `POST /api/auth/password-reset/confirm`. */
export const passwordResetConfirmSchema = z.object({
  token: tokenSchema,
  password: passwordSchema,
});
export type PasswordResetConfirmInput = z.infer<typeof passwordResetConfirmSchema>;

/** `GET /api/auth/invitations/:token` answers with this. */
export const invitationSchema = z.object({ email: z.string(), name: z.string() });
export type Invitation = z.infer<typeof invitationSchema>;

/** Body of `POST /api/auth/invitations/accept`. */
export const acceptInvitationSchema = z.object({
  token: tokenSchema,
  name: personNameSchema,
  password: passwordSchema,
});
export type AcceptInvitationInput = z.infer<typeof acceptInvitationSchema>;

/** Body of `POST /api/auth/unlock`: the token of the link e-mailed when an account was locked. */
export const unlockAccountSchema = z.object({ token: tokenSchema });
export type UnlockAccountInput = z.infer<typeof unlockAccountSchema>;
