import { AppError } from '../http/errors';

/** Named errors of the sign-in and members feature. */
export const emailUnverified = (email: string) =>
  new AppError(
    403,
    'email_unverified',
    `Confirm your e-mail address first: open the link we sent to ${email} (you can send a new one from your account page).`,
  );
export const lastTrustAdmin = () =>
  new AppError(
    409,
    'last_trust_admin',
    'A trust needs at least one trust admin. Make someone else a trust admin first.',
  );
export const emailTaken = () =>
  new AppError(
    409,
    'email_taken',
    'An account with this e-mail address already exists. Sign in, or reset the password if you have forgotten it.',
  );
export const invitationNotUsable = (reason: 'used' | 'expired' | 'cancelled' | 'missing' | 'other_email') => {
  const messages = {
    used: 'This invitation has already been used. Sign in to open the trust, or ask its trust admin for a new invitation.',
    expired: 'This invitation has expired. Ask the trust admin who sent it for a new one.',
    cancelled: 'This invitation was withdrawn by the trust. Ask its trust admin if you still need access.',
    missing: 'We could not find this invitation. Check that you opened the whole link from the e-mail.',
    other_email: 'This invitation was sent to a different e-mail address. Sign in with that address to accept it.',
  } as const;
  return new AppError(reason === 'missing' ? 404 : 409, `invitation_${reason}`, messages[reason]);
};
export const membershipNotUsable = () =>
  new AppError(403, 'membership_not_usable', 'You are not a member of that trust, or your access to it has ended.');

interface BetterAuthApiError {
  statusCode: number;
  body?: { code?: string; message?: string };
  message: string;
}

function isBetterAuthApiError(error: unknown): error is BetterAuthApiError {
  return error instanceof Error && typeof (error as Partial<BetterAuthApiError>).statusCode === 'number';
}

/** Plain-language messages for the better-auth error codes people can meet. */
const AUTH_MESSAGES: Record<string, string> = {
  INVALID_EMAIL_OR_PASSWORD: 'That e-mail address and password do not match. Check both, or reset your password.',
  INVALID_PASSWORD: 'Your current password is not right.',
  INVALID_TOKEN: 'This link has expired or has already been used. Ask for a new one.',
  USER_ALREADY_EXISTS:
    'An account with this e-mail address already exists. Sign in, or reset the password if you have forgotten it.',
  USER_ALREADY_EXISTS_USE_ANOTHER_EMAIL:
    'An account with this e-mail address already exists. Sign in, or reset the password if you have forgotten it.',
  PASSWORD_TOO_SHORT: 'Choose a password of at least 10 characters.',
  PASSWORD_TOO_LONG: 'Choose a password of at most 128 characters.',
  USER_IS_ALREADY_A_MEMBER_OF_THIS_ORGANIZATION: 'That person is already a member of this trust.',
  USER_IS_ALREADY_INVITED_TO_THIS_ORGANIZATION: 'That person has already been invited to this trust.',
  YOU_CANNOT_LEAVE_THE_ORGANIZATION_AS_THE_ONLY_OWNER:
    'A trust needs at least one trust admin. Make someone else a trust admin first.',
  YOU_CANNOT_LEAVE_THE_ORGANIZATION_WITHOUT_AN_OWNER:
    'A trust needs at least one trust admin. Make someone else a trust admin first.',
};

/** Turns an error thrown by a better-auth endpoint into our AppError; other errors pass through. */
export function fromAuthError(error: unknown): unknown {
  if (!isBetterAuthApiError(error)) return error;
  const code = error.body?.code ?? 'AUTH_ERROR';
  const message = AUTH_MESSAGES[code] ?? error.body?.message ?? error.message;
  return new AppError(error.statusCode, code.toLowerCase(), message);
}

/** Runs a better-auth call, rethrowing its errors as AppErrors. */
export async function authCall<T>(call: () => Promise<T>): Promise<T> {
  try {
    return await call();
  } catch (error) {
    throw fromAuthError(error);
  }
}
/** 403: the member's access is limited to some schools, and `action` reaches beyond them. */
export const limitedToSchools = (action: string) =>
  new AppError(
    403,
    'limited_to_schools',
    `Your access is limited to some schools, so you cannot ${action}. Ask a trust admin with access to every school.`,
  );
