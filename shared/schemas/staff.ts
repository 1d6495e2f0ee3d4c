import { z } from 'zod';
import { labelText } from './common';
import { roleSchema, staffRoleSchema } from './vocabulary';

/**
 * The one form of an e-mail address for lookups: what sign-in looks the account up by is exactly
 * what the sign-in limits count against (server/http/sign-in-guard.ts).
 */
export const normaliseEmail = (raw: string): string => raw.trim().toLowerCase();

const email = z.string().transform(normaliseEmail).pipe(z.email({ message: 'Enter an e-mail address such as name@studio.test' })).pipe(z.string().max(254));
const name = labelText(120, 'Enter a name');
export const passwordSchema = z.string().min(10, 'Use at least 10 characters').max(200, 'Keep the password under 200 characters');

export const userSchema = z.object({
  id: z.number(),
  email: z.string(),
  name: z.string(),
  role: roleSchema,
  active: z.boolean(),
  digestOptOut: z.boolean(),
});
export type User = z.infer<typeof userSchema>;

export const meSchema = userSchema.pick({ id: true, email: true, name: true, role: true });
export type Me = z.infer<typeof meSchema>;

/** An active instructor as everyone signed in may see them (`GET /api/instructors`): a name to pick, nothing of staff administration. */
export const instructorSchema = userSchema.pick({ id: true, name: true });
export type Instructor = z.infer<typeof instructorSchema>;
export const instructorListSchema = z.array(instructorSchema);

export const createUserSchema = z.object({ email, name, role: staffRoleSchema, password: passwordSchema });
export type CreateUser = z.infer<typeof createUserSchema>;

export const updateUserSchema = z
  .object({ name: name.optional(), role: staffRoleSchema.optional(), active: z.boolean().optional(), digestOptOut: z.boolean().optional() })
  .strict();
export type UpdateUser = z.infer<typeof updateUserSchema>;

export const resetPasswordSchema = z.object({ password: passwordSchema });

export const signInSchema = z.object({ email, password: z.string().min(1, 'Enter your password').max(200) });
export type SignIn = z.infer<typeof signInSchema>;

/** What anyone may change about their own account. Safety alerts cannot be turned off. */
export const myPreferencesSchema = z.object({ digestOptOut: z.boolean() }).strict();
export type MyPreferences = z.infer<typeof myPreferencesSchema>;
