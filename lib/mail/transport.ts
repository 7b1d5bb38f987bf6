/**
 * The one nodemailer transport (SMTP from the environment, see ./config). Outside production it
 * defaults to the local fake server on 127.0.0.1:2525 (scripts/mail-server.ts).
 */
import nodemailer, { type Transporter } from 'nodemailer';
import { smtpSettings, type SmtpSettings } from './config';

const globalForMail = globalThis as unknown as { __quorumMail?: { key: string; transport: Transporter } };

/** A transport for the current settings (cached; a change of settings makes a new one). */
export function mailTransport(settings: SmtpSettings = smtpSettings()): Transporter {
  const key = JSON.stringify(settings);
  if (globalForMail.__quorumMail?.key === key) return globalForMail.__quorumMail.transport;
  const transport = nodemailer.createTransport({
    host: settings.host,
    port: settings.port,
    secure: settings.port === 465,
    auth: settings.user ? { user: settings.user, pass: settings.pass ?? '' } : undefined,
    // the local fake speaks plain SMTP; a real relay must offer STARTTLS
    ignoreTLS: settings.local,
    requireTLS: !settings.local && settings.port !== 465,
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 20_000,
  });
  globalForMail.__quorumMail = { key, transport };
  return transport;
}

export type OutgoingMail = { to: string; subject: string; text: string; html?: string };

/** Sends one message; resolves with the SMTP message id. */
export async function sendMail(mail: OutgoingMail, settings: SmtpSettings = smtpSettings()): Promise<string> {
  const info = await mailTransport(settings).sendMail({ from: settings.from, ...mail });
  return String(info.messageId ?? '');
}
