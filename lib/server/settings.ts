/**
 * Settings of the production server (scripts/serve.ts), read from the environment and checked
 * before anything starts. Plain TypeScript (no server-only) so the start script and unit tests share it.
 */
import { secretProblem } from '@/lib/auth/secret';

export type ServerSettings = {
  host: string;
  port: number;
  /** The demo start (scripts/start-demo.sh) may enable the in-app mailbox; a deployment may not. */
  demo: boolean;
  migrate: boolean;
};

/** The settings, or the list of problems that keep the server from starting (one sentence each). */
export function serverSettings(env: Record<string, string | undefined>): { settings: ServerSettings; problems: string[] } {
  const problems: string[] = [];
  const secret = secretProblem(env);
  if (secret) problems.push(secret);
  const demo = env.QUORUM_DEMO === '1';
  if (!demo && env.QUORUM_DEV_MAILBOX === '1') {
    problems.push('QUORUM_DEV_MAILBOX=1 shows every e-mail to admins and is for the demo only; unset it and configure SMTP_HOST.');
  }
  const host = (env.QUORUM_HOST ?? '127.0.0.1').trim();
  if (!host) problems.push('QUORUM_HOST is empty; set the address to listen on (e.g. 127.0.0.1 behind a reverse proxy).');
  const rawPort = (env.PORT ?? '3000').trim();
  const port = Number(rawPort);
  if (!Number.isInteger(port) || port < 1 || port > 65535) problems.push(`PORT must be a whole number from 1 to 65535 (got "${rawPort}").`);
  return { settings: { host, port, demo, migrate: env.QUORUM_SKIP_MIGRATE !== '1' }, problems };
}
