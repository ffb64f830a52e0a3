/**
 * Outgoing mail. One nodemailer transport per process, pointed at SMTP_URL: the local mail
 * catcher in development and tests, the organisation's real SMTP server in production.
 */
import nodemailer, { type Transporter } from 'nodemailer';

export const defaultSmtpUrl = 'smtp://127.0.0.1:2525';

let transport: Transporter | undefined;

export function mailTransport(): Transporter {
  transport ??= nodemailer.createTransport(process.env.SMTP_URL ?? defaultSmtpUrl, {
    from: process.env.MAIL_FROM ?? 'Latchwell <no-reply@latchwell.test>',
  });
  return transport;
}
