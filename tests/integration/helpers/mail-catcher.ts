/** The local fake SMTP server (scripts/mail-server.ts) for integration tests, on a free loopback port. */
import { spawn, type ChildProcess } from 'node:child_process';
import net from 'node:net';

export async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = net.createServer().listen(0, '127.0.0.1', () => {
      const p = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(p));
    });
  });
}

/** Starts the catcher storing messages in `dir`; resolves once it listens. */
export async function startMailCatcher(dir: string): Promise<{ port: number; server: ChildProcess }> {
  const port = await freePort();
  const server = spawn(process.execPath, ['--import', 'tsx', 'scripts/mail-server.ts'], {
    env: { ...process.env, QUORUM_MAIL_PORT: String(port), QUORUM_MAIL_DIR: dir },
    stdio: ['ignore', 'pipe', 'inherit'],
  });
  await new Promise<void>((resolve, reject) => {
    server.stdout!.on('data', (d: Buffer) => d.toString().includes('fake SMTP server') && resolve());
    server.on('exit', (code) => reject(new Error(`mail server exited with ${code}`)));
  });
  return { port, server };
}
