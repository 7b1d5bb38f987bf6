/**
 * A local fake SMTP server for development, the demo and the browser tests. It accepts every
 * message on 127.0.0.1 (port QUORUM_MAIL_PORT, default 2525; no auth, no TLS), parses it and
 * stores it as JSON ({ to, from, subject, text, html, date }) in QUORUM_MAIL_DIR (default
 * .data/mail/<database name>). lib/mail/mailbox.ts reads them back.
 *
 *   node --import tsx scripts/mail-server.ts [--exit-with-parent]
 *
 * --exit-with-parent: stop when the process that started it ends (used by scripts/e2e-server.sh).
 */
import { mkdir, rename, writeFile } from 'node:fs/promises';
import { randomBytes } from 'node:crypto';
import path from 'node:path';
import { SMTPServer } from 'smtp-server';
import { simpleParser, type AddressObject } from 'mailparser';
import { fakeMailPort, mailDir } from '../lib/mail/config';

const port = fakeMailPort();
const dir = mailDir();

function addresses(value: AddressObject | AddressObject[] | undefined): string[] {
  const list = value ? (Array.isArray(value) ? value : [value]) : [];
  return list.flatMap((a) => a.value.map((v) => v.address ?? '').filter(Boolean));
}

const server = new SMTPServer({
  secure: false,
  authOptional: true,
  disabledCommands: ['STARTTLS', 'AUTH'],
  banner: 'Quorum fake mail server (messages are stored, never delivered)',
  size: 10 * 1024 * 1024,
  logger: false,
  onData(stream, session, callback) {
    simpleParser(stream)
      .then(async (parsed) => {
        const envelopeTo = session.envelope.rcptTo.map((r) => r.address);
        const mail = {
          to: envelopeTo.length ? envelopeTo : addresses(parsed.to),
          from: addresses(parsed.from)[0] ?? (session.envelope.mailFrom ? session.envelope.mailFrom.address : ''),
          subject: parsed.subject ?? '',
          text: parsed.text ?? '',
          html: typeof parsed.html === 'string' ? parsed.html : null,
          date: new Date().toISOString(),
        };
        await mkdir(dir, { recursive: true });
        const name = `${Date.now()}-${randomBytes(4).toString('hex')}`;
        const tmp = path.join(dir, `.${name}.tmp`);
        await writeFile(tmp, JSON.stringify(mail, null, 2));
        await rename(tmp, path.join(dir, `${name}.json`)); // readers never see half a file
        console.log(`[mail] ${mail.to.join(', ')}: ${mail.subject}`);
        callback();
      })
      .catch((err: Error) => {
        console.error('[mail] could not store a message:', err.message);
        callback(err);
      });
  },
});

server.on('error', (err: NodeJS.ErrnoException) => {
  if (err.code === 'EADDRINUSE') {
    console.error(`[mail] port ${port} on 127.0.0.1 is taken: another mail server runs there. Stop it or set QUORUM_MAIL_PORT.`);
    process.exit(1);
  }
  console.error('[mail]', err.message);
});

server.listen(port, '127.0.0.1', () => {
  console.log(`[mail] fake SMTP server on 127.0.0.1:${port}, storing messages in ${dir}`);
});

function stop() {
  server.close(() => process.exit(0));
  setTimeout(() => process.exit(0), 2000).unref();
}
process.on('SIGTERM', stop);
process.on('SIGINT', stop);

if (process.argv.includes('--exit-with-parent')) {
  const parent = process.ppid;
  setInterval(() => {
    try {
      process.kill(parent, 0);
      if (process.ppid !== parent) stop();
    } catch {
      stop();
    }
  }, 1000).unref();
}
