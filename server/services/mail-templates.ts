/** Texts of the account mails. Plain text plus a simple HTML alternative; links carry the token once. */
import type { MailMessage } from './mail';

function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

export function setPasswordLink(publicUrl: string, token: string): string {
  return `${publicUrl}/set-password?token=${encodeURIComponent(token)}`;
}

export function invitationMail(to: string, displayName: string, role: string, link: string, validHours: number): MailMessage {
  const text = [
    `Hello ${displayName},`,
    '',
    `You have been invited to Aftercue as ${role}. Choose your password here:`,
    link,
    '',
    `The link works once and expires in ${validHours} hours.`,
    'Aftercue is for research use only; it is not a medical device.',
  ].join('\n');
  const html = `<p>Hello ${escapeHtml(displayName)},</p><p>You have been invited to Aftercue as ${escapeHtml(role)}. `
    + `<a href="${escapeHtml(link)}">Choose your password</a>.</p>`
    + `<p>The link works once and expires in ${validHours} hours.</p>`;
  return { to, subject: 'Your Aftercue invitation', text, html };
}

export function resetMail(to: string, displayName: string, link: string, validMinutes: number): MailMessage {
  const text = [
    `Hello ${displayName},`,
    '',
    'Someone asked to reset your Aftercue password. If it was you, choose a new one here:',
    link,
    '',
    `The link works once and expires in ${validMinutes} minutes. If you did not ask, ignore this mail.`,
  ].join('\n');
  const html = `<p>Hello ${escapeHtml(displayName)},</p><p>Someone asked to reset your Aftercue password. `
    + `If it was you, <a href="${escapeHtml(link)}">choose a new one</a>.</p>`
    + `<p>The link works once and expires in ${validMinutes} minutes. If you did not ask, ignore this mail.</p>`;
  return { to, subject: 'Reset your Aftercue password', text, html };
}
