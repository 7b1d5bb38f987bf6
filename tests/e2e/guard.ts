import { resolveDbSettings } from '../../lib/db/config';

const LOCAL = new Set(['127.0.0.1', 'localhost', '::1']);

/** Refuses to run browser tests against a database that is not on this machine. */
export default function guard() {
  const settings = resolveDbSettings({ ...process.env, QUORUM_DB_NAME: process.env.QUORUM_DB_NAME ?? 'quorum_e2e' });
  if (!LOCAL.has(settings.host)) {
    throw new Error(`Browser tests refuse to run against ${settings.displayUrl}: they reset their database. Use a local server.`);
  }
}
