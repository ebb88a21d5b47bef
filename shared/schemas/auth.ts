import { z } from 'zod';

export const ROLES = ['technician', 'engineer', 'coordinator', 'driver', 'lead', 'admin'] as const;
export const RoleSchema = z.enum(ROLES);
export type Role = z.infer<typeof RoleSchema>;

export const ROLE_LABELS: Record<Role, string> = {
  technician: 'Garage technician',
  engineer: 'Integration engineer',
  coordinator: 'Fleet coordinator',
  driver: 'Test driver',
  lead: 'Program lead',
  admin: 'Administrator',
};

export const EmailSchema = z.string().trim().toLowerCase().max(254).email('Enter a valid e-mail address.');
export const PasswordSchema = z
  .string()
  .min(10, 'Use at least 10 characters.')
  .max(128, 'Use at most 128 characters.');

export const SignInSchema = z.strictObject({
  email: EmailSchema,
  password: z.string().min(1, 'Enter your password.').max(128),
});
export type SignIn = z.infer<typeof SignInSchema>;

export const ProgramSchema = z.object({
  id: z.string(),
  code: z.string(),
  name: z.string(),
});
export type Program = z.infer<typeof ProgramSchema>;

export const UserSchema = z.object({
  id: z.string(),
  email: z.string(),
  name: z.string(),
  role: RoleSchema,
  active: z.boolean(),
});
export type User = z.infer<typeof UserSchema>;

export const SignInResponseSchema = z.object({ token: z.string(), user: UserSchema });
export type SignInResponse = z.infer<typeof SignInResponseSchema>;

export const MeSchema = z.object({ user: UserSchema, programs: z.array(ProgramSchema) });
export type Me = z.infer<typeof MeSchema>;

export const ForgotPasswordSchema = z.strictObject({ email: EmailSchema });
export const SetPasswordSchema = z.strictObject({
  token: z.string().min(20).max(200),
  password: PasswordSchema,
});
export type SetPassword = z.infer<typeof SetPasswordSchema>;

export const HealthSchema = z.object({ status: z.enum(['ok', 'degraded']), db: z.enum(['up', 'down']) });
export type Health = z.infer<typeof HealthSchema>;
