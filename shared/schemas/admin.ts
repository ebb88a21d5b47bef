import { z } from 'zod';
import { EmailSchema, ProgramSchema, RoleSchema, UserSchema } from './auth';

export const NameSchema = z.string().trim().min(1, 'Enter a name.').max(120, 'Use at most 120 characters.');

export const AdminUserSchema = UserSchema.extend({
  programIds: z.array(z.string()),
  invitedPending: z.boolean(),
  version: z.number().int(),
});
export type AdminUser = z.infer<typeof AdminUserSchema>;
export const AdminUserListSchema = z.object({ users: z.array(AdminUserSchema) });

export const InviteUserSchema = z.strictObject({
  email: EmailSchema,
  name: NameSchema,
  role: RoleSchema,
  programIds: z.array(z.uuid()).min(1, 'Choose at least one program.').max(50),
});
export type InviteUser = z.infer<typeof InviteUserSchema>;

export const UpdateUserSchema = z.strictObject({
  role: RoleSchema.optional(),
  active: z.boolean().optional(),
  name: NameSchema.optional(),
  programIds: z.array(z.uuid()).max(50).optional(),
  version: z.number().int().min(0),
});
export type UpdateUser = z.infer<typeof UpdateUserSchema>;

export const ProgramCodeSchema = z
  .string()
  .trim()
  .toUpperCase()
  .regex(/^[A-Z0-9][A-Z0-9-]{0,11}$/, 'Use 1 to 12 letters, digits or dashes.');

export const CreateProgramSchema = z.strictObject({ code: ProgramCodeSchema, name: NameSchema });
export type CreateProgram = z.infer<typeof CreateProgramSchema>;

export const ProgramDetailSchema = ProgramSchema.extend({
  members: z.array(UserSchema),
});
export type ProgramDetail = z.infer<typeof ProgramDetailSchema>;
export const ProgramListSchema = z.object({ programs: z.array(ProgramSchema.extend({ memberCount: z.number() })) });

export const SetMembersSchema = z.strictObject({ userIds: z.array(z.uuid()).max(1000) });

/**
 * A program's active members as any member sees them (GET /api/programs/:id/members), for owner,
 * watcher and attendee pickers: name and role only. No e-mail address: the pickers need none,
 * and mail to members goes out from the server.
 */
export const ProgramMemberSchema = z.object({ id: z.string(), name: z.string(), role: RoleSchema });
export type ProgramMember = z.infer<typeof ProgramMemberSchema>;
export const ProgramMemberListSchema = z.object({ items: z.array(ProgramMemberSchema) });

export const MailMessageSchema = z.object({
  id: z.string(),
  to: z.string(),
  subject: z.string(),
  text: z.string(),
  date: z.string(),
});
export type MailMessage = z.infer<typeof MailMessageSchema>;
export const MailListSchema = z.object({ messages: z.array(MailMessageSchema) });
