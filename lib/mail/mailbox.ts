/**
 * Reads the messages the fake mail server (scripts/mail-server.ts) stored as JSON files, newest
 * first. Used by the browser tests and the development mailbox page; no framework imports.
 */
import { readdir, readFile } from 'node:fs/promises';
import path from 'node:path';
import { mailDir } from './config';

export type StoredMail = {
  id: string;
  to: string[];
  from: string;
  subject: string;
  text: string;
  html: string | null;
  date: string; // ISO 8601
};

/** Every stored message, newest first. */
export async function listMail({ dir = mailDir() }: { dir?: string } = {}): Promise<StoredMail[]> {
  let names: string[];
  try {
    names = (await readdir(/*turbopackIgnore: true*/ dir)).filter((n) => n.endsWith('.json'));
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return [];
    throw err;
  }
  const out: StoredMail[] = [];
  for (const name of names) {
    try {
      const mail = JSON.parse(await readFile(path.join(/*turbopackIgnore: true*/ dir, name), 'utf8')) as StoredMail;
      out.push({ ...mail, id: name.replace(/\.json$/, '') });
    } catch {
      // a file being written right now: skip it, it shows up on the next read
    }
  }
  return out.sort((a, b) => (a.date < b.date ? 1 : a.date > b.date ? -1 : a.id < b.id ? 1 : -1));
}

/** Messages addressed to one recipient (case-insensitive), newest first. */
export async function mailTo({ to, dir }: { to: string; dir?: string }): Promise<StoredMail[]> {
  const want = to.trim().toLowerCase();
  return (await listMail({ dir })).filter((m) => m.to.some((t) => t.toLowerCase() === want));
}

/**
 * Waits for a message to `to` (optionally whose subject matches) received after `since`;
 * polls the directory every 200 ms until `timeoutMs`.
 */
export async function waitForMail({
  to,
  subject,
  since,
  timeoutMs = 15_000,
  dir,
}: {
  to: string;
  subject?: RegExp;
  since?: Date;
  timeoutMs?: number;
  dir?: string;
}): Promise<StoredMail> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const found = (await mailTo({ to, dir })).find(
      (m) => (!subject || subject.test(m.subject)) && (!since || new Date(m.date).getTime() >= since.getTime() - 1000),
    );
    if (found) return found;
    if (Date.now() > deadline) throw new Error(`no e-mail to ${to}${subject ? ` matching ${subject}` : ''} arrived within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

/** The first link in a message's plain text that starts with `prefix` (e.g. "/invitations/"). */
export function linkIn(mail: Pick<StoredMail, 'text'>, prefix: string): string {
  const match = mail.text.match(/https?:\/\/\S+/g)?.find((u) => new URL(u).pathname.startsWith(prefix));
  if (!match) throw new Error(`no link to ${prefix} in the message`);
  return match;
}
