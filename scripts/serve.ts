/**
 * npm start – Quorum as a deployment: checks the settings (a real NEXTAUTH_SECRET, no dev mailbox),
 * migrates the database (never seeds), and serves the production build on QUORUM_HOST:PORT
 * (default 127.0.0.1:3000). Run `npm run build` first and `npm run worker` beside it.
 *
 * The server writes the connection's peer address into the x-quorum-peer header of every request
 * (overwriting whatever the client sent), so per-address sign-in throttles work without a proxy;
 * lib/auth/client-address.ts believes that header only in this process (QUORUM_PEER_HEADER=1).
 * SIGTERM / SIGINT: stops accepting connections, lets open requests finish, closes the pool.
 */
import { existsSync } from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { serverSettings } from '@/lib/server/settings';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');

function fail(message: string, code = 2): never {
  process.stderr.write(`quorum: ${message}\n`);
  process.exit(code);
}

async function main(): Promise<void> {
  const { settings, problems } = serverSettings(process.env);
  if (problems.length) fail(`not starting:\n  - ${problems.join('\n  - ')}`);
  const distDir = process.env.QUORUM_NEXT_DIST || '.next';
  if (!existsSync(path.join(root, distDir, 'BUILD_ID'))) fail(`no production build in ${distDir}/ — run \`npm run build\` first`);
  Object.assign(process.env, { NODE_ENV: 'production', QUORUM_PEER_HEADER: '1' });

  const { checkDatabase, db } = await import('@/lib/db/knex');
  try {
    await checkDatabase(db);
  } catch (err) {
    fail((err as Error).message, 3);
  }
  if (settings.migrate) {
    const { migrationSource } = await import('../knexfile');
    const [, applied] = (await db.migrate.latest({ migrationSource })) as [number, string[]];
    console.log(applied.length ? `quorum: applied ${applied.length} migration(s)` : 'quorum: database schema is current');
  }
  const { sweepUploadLeftovers } = await import('@/lib/storage/sweep');
  await sweepUploadLeftovers({ log: (line) => console.log(`quorum: ${line}`) }).catch((err) =>
    console.error('quorum: sweeping uploads/tmp failed:', err),
  );

  const next = (await import('next')).default;
  const app = next({ dev: false, dir: root, hostname: settings.host, port: settings.port });
  await app.prepare();
  const handle = app.getRequestHandler();
  const server = http.createServer((req, res) => {
    req.headers['x-quorum-peer'] = req.socket.remoteAddress ?? '';
    void handle(req, res);
  });
  server.on('error', (err) => fail(`cannot listen on ${settings.host}:${settings.port}: ${err.message}`, 4));
  server.listen(settings.port, settings.host, () => {
    console.log(
      `quorum: serving on http://${settings.host.includes(':') ? `[${settings.host}]` : settings.host}:${settings.port}${settings.demo ? ' (demo)' : ''}`,
    );
  });
  const sweeper = setInterval(() => void sweepUploadLeftovers({}).catch(() => undefined), 60 * 60 * 1000);
  sweeper.unref();
  let stopping = false;
  const stop = () => {
    if (stopping) process.exit(1);
    stopping = true;
    server.close(() => void db.destroy().finally(() => process.exit(0)));
    server.closeIdleConnections();
  };
  process.on('SIGTERM', stop);
  process.on('SIGINT', stop);
}

main().catch((err) => fail(`could not start: ${(err as Error).stack ?? err}`, 1));
