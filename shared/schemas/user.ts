import { z } from 'zod';
import { roles } from '../permissions/roles.ts';
import { queryBooleanSchema, searchTextSchema, sortableListQuerySchema } from './pagination.ts';

export const roleSchema = z.enum(roles);

export const unitSystems = ['metric', 'us'] as const;
/** A person's display units. The API itself always speaks litres, °C and kPa gauge. */
export const unitSystemSchema = z.enum(unitSystems);
export type UnitSystem = z.infer<typeof unitSystemSchema>;

export const emailSchema = z
  .string()
  .trim()
  .toLowerCase()
  .max(254, 'That e-mail address is too long')
  .pipe(z.email('Enter an e-mail address like name@example.org'));

/** Who a person is, as every answer about them names them: the fields a session user and a listed user share. */
export const personSchema = z.object({
  id: z.string(),
  email: z.string(),
  name: z.string(),
  roles: z.array(roleSchema),
});

export const personNameSchema = z.string().trim().min(1, 'Enter a name').max(120, 'Keep the name under 120 characters');

export const rolesSchema = z
  .array(roleSchema)
  .min(1, 'Pick at least one role')
  .refine((list) => new Set(list).size === list.length, 'Pick each role once');

/** Body of `POST /api/users/invitations`. */
export const inviteUserSchema = z.object({
  email: emailSchema,
  name: personNameSchema,
  roles: rolesSchema,
});
export type InviteUserInput = z.infer<typeof inviteUserSchema>;

/** The fields of `PATCH /api/users/:id`, without the "something must change" rule (for forms). */
export const updateUserFieldsSchema = z.object({
  roles: rolesSchema.optional(),
  isActive: z.boolean().optional(),
  name: personNameSchema.optional(),
});

/** Body of `PATCH /api/users/:id` (admin). */
export const updateUserSchema = updateUserFieldsSchema.refine((body) => Object.values(body).some((value) => value !== undefined), 'Nothing to change');
export type UpdateUserInput = z.infer<typeof updateUserSchema>;

/** The edit-roles form: just the roles. */
export const userRolesSchema = z.object({ roles: rolesSchema });
export type UserRolesInput = z.infer<typeof userRolesSchema>;

/** A person as the admin's member list shows them. Timestamps are ISO 8601 strings. */
export const userSchema = personSchema.extend({
  isActive: z.boolean(),
  lastLoginAt: z.string().nullable(),
  createdAt: z.string(),
});
export type User = z.infer<typeof userSchema>;

export const userSortFields = ['name', 'email', 'createdAt', 'lastLoginAt'] as const;
export type UserSortField = (typeof userSortFields)[number];

/** `GET /api/users?page&pageSize&sort&order&q&role&active`. */
export const userListQuerySchema = sortableListQuerySchema(userSortFields, 'name').extend({
  q: searchTextSchema,
  role: roleSchema.optional(),
  active: queryBooleanSchema,
});
export type UserListQuery = z.infer<typeof userListQuerySchema>;
