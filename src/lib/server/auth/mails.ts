/**
 * The e-mails sign-in sends: a homeowner's one-time link and a staff invitation. Plain text
 * first (what the catcher and most phones show), with a simple HTML twin. They are queued in
 * the outbox by the transaction that creates the link (see outbox.ts).
 */
export interface LinkMail {
  subject: string;
  text: string;
  html: string;
}

function escapeHtml(text: string): string {
  return text.replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] ?? c,
  );
}

function htmlBody(paragraphs: string[], link: string, button: string): string {
  const text = paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`).join('');
  return `<div style="font-family:sans-serif;font-size:16px;line-height:1.5">${text}<p><a href="${escapeHtml(link)}" style="display:inline-block;padding:12px 20px;background:#1d2c3f;color:#fff;border-radius:8px;text-decoration:none">${escapeHtml(button)}</a></p><p style="color:#3b5370;font-size:14px">${escapeHtml(link)}</p></div>`;
}

export function signInLinkMail(
  to: { name: string },
  organisationName: string,
  link: string,
  validMinutes: number,
): LinkMail {
  const paragraphs = [
    `Hello ${to.name},`,
    `Here is your link to sign in to ${organisationName}'s gate safety reports on Latchwell. It works once and for ${validMinutes} minutes.`,
    `If you did not ask for it, you can ignore this e-mail.`,
  ];
  return {
    subject: `Your sign-in link for ${organisationName}`,
    text: `${paragraphs.join('\n\n')}\n\nSign in: ${link}\n`,
    html: htmlBody(paragraphs, link, 'Sign in'),
  };
}

export function invitationMail(
  organisationName: string,
  invitedBy: string,
  roleLabel: string,
  link: string,
  validDays: number,
): LinkMail {
  const paragraphs = [
    `${invitedBy} has invited you to join ${organisationName} on Latchwell as ${roleLabel}.`,
    `Open the link to choose your name and password. It works once and for ${validDays} days.`,
  ];
  return {
    subject: `You're invited to ${organisationName} on Latchwell`,
    text: `${paragraphs.join('\n\n')}\n\nAccept the invitation: ${link}\n`,
    html: htmlBody(paragraphs, link, 'Accept the invitation'),
  };
}

export function passwordResetMail(
  to: { name: string },
  organisationName: string,
  link: string,
  validMinutes: number,
): LinkMail {
  const paragraphs = [
    `Hello ${to.name},`,
    `Someone asked to reset your password for ${organisationName} on Latchwell. Open the link to choose a new one. It works once and for ${validMinutes} minutes, and signs you out everywhere.`,
    `If you did not ask for it, ignore this e-mail: your password stays as it is.`,
  ];
  return {
    subject: `Reset your Latchwell password for ${organisationName}`,
    text: `${paragraphs.join('\n\n')}\n\nChoose a new password: ${link}\n`,
    html: htmlBody(paragraphs, link, 'Choose a new password'),
  };
}
