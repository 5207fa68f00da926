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

/** Invites someone to join a trust with a role. */
export function invitationMail(
  to: string,
  details: { trustName: string; inviterName: string; roleLabel: string; url: string; expiresAt: Date },
): MailMessage {
  const expires = details.expiresAt.toLocaleDateString('en-GB', { day: 'numeric', month: 'long', year: 'numeric' });
  return message(
    to,
    `${details.inviterName} invited you to ${details.trustName} on Airtally`,
    `Join ${details.trustName} on Airtally`,
    [
      `${details.inviterName} has invited you to work with ${details.trustName} on Airtally as ${details.roleLabel}.`,
      'Airtally keeps the trust’s school estate in one place and ranks the classrooms whose air most needs attention.',
      `The invitation can be used once, until ${expires}.`,
    ],
    { label: 'Accept the invitation', url: details.url },
    'If you were not expecting this, you can ignore it; no account is created unless you accept.',
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
