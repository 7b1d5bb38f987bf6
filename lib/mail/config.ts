/**
 * Mail settings from the environment, shared by the web app, the worker, the fake mail server and
 * the tests (no framework imports).
 *
 * - SMTP_HOST, SMTP_PORT, SMTP_USER, SMTP_PASS: the facility's SMTP relay. Outside production the
 *   default is the local fake server (scripts/mail-server.ts) on 127.0.0.1:${QUORUM_MAIL_PORT||2525}.
 * - MAIL_FROM: sender address (default "Quorum <quorum@localhost>").
 * - QUORUM_FACILITY_NAME: shown in every message (default "Fernhollow Imaging Core").
 * - QUORUM_MAIL_DIR: where the fake server stores messages as JSON
 *   (default .data/mail/<database name>, so parallel test databases keep separate mailboxes).
 * - QUORUM_DEV_MAILBOX=1: enables the in-app mailbox (/dev/mailbox) in a production build
 *   (the e2e server and the demo set it); it is always on outside production.
 */
import path from 'node:path';
import { resolveDbSettings } from '../db/config';

type Env = Record<string, string | undefined>;

export const DEFAULT_MAIL_PORT = 2525;
export const DEFAULT_FACILITY_NAME = 'Fernhollow Imaging Core';

export type SmtpSettings = {
  host: string;
  port: number;
  user?: string;
  pass?: string;
  from: string;
  /** true when this is the local fake server (no TLS, no auth). */
  local: boolean;
};

function port(value: string | undefined, fallback: number, name: string): number {
  if (!value) return fallback;
  const n = Number(value);
  if (!Number.isInteger(n) || n <= 0 || n > 65535) throw new Error(`${name} must be a TCP port number (got "${value}")`);
  return n;
}

/** The port the fake mail server listens on. */
export function fakeMailPort(env: Env = process.env): number {
  return port(env.QUORUM_MAIL_PORT, DEFAULT_MAIL_PORT, 'QUORUM_MAIL_PORT');
}

/** SMTP settings; throws in production when SMTP_HOST is missing. */
export function smtpSettings(env: Env = process.env): SmtpSettings {
  const from = env.MAIL_FROM?.trim() || 'Quorum <quorum@localhost>';
  const host = env.SMTP_HOST?.trim();
  if (host) {
    return {
      host,
      port: port(env.SMTP_PORT, 587, 'SMTP_PORT'),
      user: env.SMTP_USER || undefined,
      pass: env.SMTP_PASS || undefined,
      from,
      local: host === '127.0.0.1' || host === 'localhost',
    };
  }
  if (env.NODE_ENV === 'production') {
    throw new Error('SMTP_HOST is not set: set SMTP_HOST, SMTP_PORT, SMTP_USER, SMTP_PASS and MAIL_FROM to send e-mail.');
  }
  return { host: '127.0.0.1', port: port(env.SMTP_PORT, fakeMailPort(env), 'SMTP_PORT'), from, local: true };
}

export function facilityName(env: Env = process.env): string {
  return env.QUORUM_FACILITY_NAME?.trim() || DEFAULT_FACILITY_NAME;
}

/** Directory of the fake server's stored messages. */
export function mailDir(env: Env = process.env): string {
  if (env.QUORUM_MAIL_DIR?.trim()) return path.resolve(env.QUORUM_MAIL_DIR.trim());
  let name = 'default';
  try {
    name = resolveDbSettings(env).database;
  } catch {
    // an unusable database setting still gets a mailbox
  }
  return path.resolve('.data', 'mail', name);
}

/** The in-app mailbox is for development, tests and the demo only. */
export function devMailboxEnabled(env: Env = process.env): boolean {
  return env.NODE_ENV !== 'production' || env.QUORUM_DEV_MAILBOX === '1';
}

/** Base address for links in e-mails (QUORUM_PUBLIC_URL, else NEXTAUTH_URL, else the request's origin outside production). */
export function publicBaseUrl(requestUrl?: string, env: Env = process.env): string {
  const configured = env.QUORUM_PUBLIC_URL?.trim() || env.NEXTAUTH_URL?.trim();
  if (configured) return configured.replace(/\/+$/, '');
  if (requestUrl && env.NODE_ENV !== 'production') return new URL(requestUrl).origin;
  if (env.NODE_ENV === 'production') throw new Error('Set NEXTAUTH_URL (or QUORUM_PUBLIC_URL) so e-mailed links point at this server.');
  return 'http://localhost:3000';
}
