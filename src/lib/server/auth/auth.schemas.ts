import { z } from 'zod';
import { ROLES } from './context';

const email = z.string().trim().toLowerCase().email('Enter a valid e-mail address.').max(254);
const password = z
  .string()
  .min(10, 'Choose a password of at least 10 characters.')
  .max(128, 'Choose a password of at most 128 characters.');
const personName = z.string().trim().min(1, 'Enter your name.').max(120);

/** A new account; with `trustName` it creates that trust, with `invitationId` it joins the inviting trust. */
export const SignUpSchema = z
  .object({
    name: personName,
    email,
    password,
    trustName: z.string().trim().min(2, 'Name your trust (at least 2 characters).').max(160).optional(),
    invitationId: z.string().trim().min(1).max(200).optional(),
  })
  .refine((v) => Boolean(v.trustName) !== Boolean(v.invitationId), {
    message: 'Name your trust, or accept an invitation to an existing one.',
    path: ['trustName'],
  });
export type SignUpInput = z.infer<typeof SignUpSchema>;

export const SignInSchema = z.object({ email, password: z.string().min(1, 'Enter your password.').max(128) });

export const RoleSchema = z.enum(ROLES, { message: `Role must be one of: ${ROLES.join(', ')}.` });

const isoDate = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date like 2027-07-31.');
const schoolIds = z.array(z.string().uuid('School ids must be valid ids.')).max(500);

/** An invitation to join the active trust, optionally limited to schools (null = all) and to an end date. */
export const InviteSchema = z.object({
  email,
  role: RoleSchema,
  schoolIds: schoolIds.nullable().optional(),
  accessEndsOn: isoDate
    .refine((d) => d > new Date().toISOString().slice(0, 10), 'The end date must be after today.')
    .nullable()
    .optional(),
});
export type InviteInput = z.infer<typeof InviteSchema>;

/** Changes to one membership: role, school limits (null = all schools), end date (null = none). */
export const MemberUpdateSchema = z
  .object({
    role: RoleSchema.optional(),
    schoolIds: schoolIds.nullable().optional(),
    accessEndsOn: isoDate.nullable().optional(),
  })
  .refine((v) => v.role !== undefined || v.schoolIds !== undefined || v.accessEndsOn !== undefined, {
    message: 'Say what to change: role, schoolIds or accessEndsOn.',
  });
export type MemberUpdate = z.infer<typeof MemberUpdateSchema>;

export const ActiveTrustSchema = z.object({ trustId: z.string().trim().min(1, 'Choose a trust.').max(200) });

export const ResetPasswordSchema = z.object({ token: z.string().min(1).max(500), password });
export const ChangePasswordSchema = z.object({
  currentPassword: z.string().min(1, 'Enter your current password.').max(128),
  newPassword: password,
});
export type ChangePasswordInput = z.infer<typeof ChangePasswordSchema>;
export const ForgotPasswordSchema = z.object({ email });
