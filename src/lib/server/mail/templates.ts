import type { MailMessage } from './mailer';

/** Escapes text for an HTML e-mail body. */
function escapeHtml(value: string): string {
  return value.replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] ?? c,
  );
}

/** A plain, readable HTML frame: one heading, a few paragraphs, one button, the link spelled out. */
function frame(heading: string, paragraphs: string[], action: { label: string; url: string }, footer: string): string {
  const body = paragraphs.map((p) => `<p style="margin:0 0 16px">${escapeHtml(p)}</p>`).join('');
  return `<!doctype html><html lang="en-GB"><body style="margin:0;padding:24px;background:#f4f6f5;font-family:'Public Sans',Arial,sans-serif;color:#1d2a27">
<div style="max-width:560px;margin:0 auto;background:#ffffff;border-radius:8px;padding:28px">
<p style="margin:0 0 20px;font-weight:700;font-size:18px;color:#1f6f5c">Airtally</p>
<h1 style="margin:0 0 16px;font-size:20px">${escapeHtml(heading)}</h1>${body}
<p style="margin:24px 0"><a href="${escapeHtml(action.url)}" style="background:#1f6f5c;color:#ffffff;padding:10px 18px;border-radius:6px;text-decoration:none;font-weight:600">${escapeHtml(action.label)}</a></p>
<p style="margin:0 0 16px;font-size:13px;color:#56635f">If the button does not work, paste this address into your browser:<br>${escapeHtml(action.url)}</p>
<p style="margin:0;font-size:13px;color:#56635f">${escapeHtml(footer)}</p>
</div></body></html>`;
}

function text(heading: string, paragraphs: string[], action: { label: string; url: string }, footer: string): string {
  return [
    heading,
    '',
    ...paragraphs.flatMap((p) => [p, '']),
    `${action.label}: ${action.url}`,
    '',
    footer,
    '',
    '— Airtally',
  ].join('\n');
}

function message(
  to: string,
  subject: string,
  heading: string,
  paragraphs: string[],
  action: { label: string; url: string },
  footer: string,
): MailMessage {
  return {
    to,
    subject,
    html: frame(heading, paragraphs, action, footer),
    text: text(heading, paragraphs, action, footer),
  };
}

/** Asks a new user to confirm that the address is theirs. */
export function verificationMail(to: { email: string; name: string }, url: string): MailMessage {
  return message(
    to.email,
    'Confirm your e-mail address for Airtally',
    `Hello ${to.name}, please confirm your address`,
    [
      'You have just created an Airtally account with this e-mail address.',
      'Confirming it lets you invite colleagues to your trust and choose a paid plan. The link works for 24 hours.',
    ],
    { label: 'Confirm my address', url },
    'If you did not create an account, you can ignore this message; nothing will happen.',
  );
}

/** Sends a link for choosing a new password. */
export function passwordResetMail(to: { email: string; name: string }, url: string): MailMessage {
  return message(
    to.email,
    'Choose a new Airtally password',
    `Hello ${to.name}, here is your password link`,
    [
      'Someone (we hope you) asked to choose a new password for this Airtally account.',
      'The link works once, for one hour. Choosing a new password signs the account out on every device.',
    ],
    { label: 'Choose a new password', url },
    'If you did not ask for this, ignore this message: your password stays as it is.',
  );
}

/** What an invitation e-mail says: who invites, to what role, limited to which schools, until when. */
export interface InvitationMailDetails {
  trustName: string;
  inviterName: string;
  inviterEmail: string;
  /** The role in words, e.g. "Estates manager". */
  roleLabel: string;
  /** What the role may do, in a sentence. */
  roleMeans: string;
  /** Names of the schools the access is limited to; null = every school of the trust. */
  schoolNames: string[] | null;
  /** The day from which access ends, already in words (en-GB, UK time), or null. */
  accessEndsOn: string | null;
  /** The day the invitation stops working, in words (en-GB, UK time). */
  expiresOn: string;
  url: string;
}

/** Invites someone to join a trust: the role in words, any school limit by name, the access end date and the inviter. */
export function invitationMail(to: string, d: InvitationMailDetails): MailMessage {
  const schools =
    d.schoolNames === null
      ? 'You will see every school of the trust.'
      : d.schoolNames.length === 0
        ? 'Your access is limited to schools, and none has been chosen yet: ask the person who invited you to add some.'
        : `Your access is limited to ${d.schoolNames.length === 1 ? 'one school' : `${d.schoolNames.length} schools`}: ${d.schoolNames.join(', ')}.`;
  const ends = d.accessEndsOn
    ? `Your access ends on ${d.accessEndsOn} (UK time): from that day on you can no longer open the trust.`
    : 'Your access has no end date.';
  return message(
    to,
    `${d.inviterName} invited you to ${d.trustName} on Airtally as ${d.roleLabel.toLowerCase()}`,
    `Join ${d.trustName} on Airtally`,
    [
      `${d.inviterName} (${d.inviterEmail}) has invited you to work with ${d.trustName} on Airtally.`,
      `Your role: ${d.roleLabel}. ${d.roleMeans}`,
      schools,
      ends,
      'Airtally keeps the trust’s school estate in one place and ranks the classrooms whose air most needs attention.',
      `The invitation can be used once, until ${d.expiresOn}. Opening it from this e-mail confirms your address, so you will not be asked to confirm it again.`,
    ],
    { label: 'Accept the invitation', url: d.url },
    'If you were not expecting this, you can ignore it; no account is created unless you accept.',
  );
}

/** Tells a person who signed up from their invitation that the account is ready (the invitation proved the address). */
export function joinedByInvitationMail(
  to: { email: string; name: string },
  trustName: string,
  signInUrl: string,
): MailMessage {
  return message(
    to.email,
    `Your Airtally account is ready: you have joined ${trustName}`,
    `Hello ${to.name}, welcome to ${trustName}`,
    [
      `Your account has been created and you have joined ${trustName}.`,
      'You opened the invitation sent to this address, so the address is already confirmed. Sign in with the password you chose.',
    ],
    { label: 'Sign in', url: signInUrl },
    'If you did not create this account, reply to the person who invited you.',
  );
}

/**
 * Answers a sign-up with an address that already has an account: the sign-up itself answered as for a
 * new address (so nobody learns which addresses have accounts); only the owner of the inbox learns it.
 */
export function existingAccountMail(
  to: { email: string; name: string },
  links: { signIn: string; resetPassword: string; invitation: string | null },
): MailMessage {
  return message(
    to.email,
    'You already have an Airtally account',
    `Hello ${to.name}, you already have an account`,
    [
      'Someone (we hope you) tried to create a new Airtally account with this e-mail address, which already has one. Nothing was changed.',
      links.invitation
        ? `To accept the invitation, sign in with your password and open the invitation again: ${links.invitation}`
        : 'Sign in with your password as usual.',
      `Forgotten your password? Choose a new one here: ${links.resetPassword}`,
    ],
    { label: 'Sign in', url: links.signIn },
    'If you did not try to create an account, you can ignore this message.',
  );
}

/** A trust admin's request to pay by invoice against a purchase order, to the trust's billing contact and to ops. */
export function invoicePaymentRequestMail(
  to: string[],
  d: {
    trustName: string;
    trustId: string;
    purchaseOrder: string;
    billingEmail: string;
    requestedBy: string;
    note: string | null;
    billingUrl: string;
  },
): MailMessage {
  return message(
    to.join(', '),
    `${d.trustName} asks to pay by invoice (purchase order ${d.purchaseOrder})`,
    `${d.trustName} asks to pay Airtally by invoice`,
    [
      `${d.requestedBy} asked for ${d.trustName} (trust id ${d.trustId}) to pay its Airtally subscription by invoice instead of by card.`,
      `Purchase-order number: ${d.purchaseOrder}. Invoices to: ${d.billingEmail}.`,
      ...(d.note ? [`Note: ${d.note}`] : []),
      'Airtally billing will arrange it and reply to the billing contact. Until then the subscription is paid as before.',
    ],
    { label: 'Open the billing page', url: d.billingUrl },
    'You received this because you are the billing contact of this trust or Airtally billing operations.',
  );
}
