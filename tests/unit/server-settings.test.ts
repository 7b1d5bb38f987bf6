/**
 * The production start's settings (lib/server/settings.ts) and the session-secret rule
 * (lib/auth/secret.ts): a deployment refuses to start without a real secret or with the demo's
 * mailbox, and listens on this machine only unless told otherwise. Common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { serverSettings } from '@/lib/server/settings';
import { secretProblem } from '@/lib/auth/secret';

const GOOD = 'a3f1c9e07b5d42e8a1c6f0b9d3e7a2c4';

describe('secretProblem', () => {
  it('refuses a missing, short, trivial or known secret and accepts a random one', () => {
    expect(secretProblem({})).toMatch(/not set/);
    expect(secretProblem({ NEXTAUTH_SECRET: 'short-one' })).toMatch(/9 characters long; use at least 32/);
    expect(secretProblem({ NEXTAUTH_SECRET: 'x'.repeat(64) })).toMatch(/trivial/);
    expect(secretProblem({ NEXTAUTH_SECRET: 'quorum-development-secret-not-for-production' })).toMatch(/well-known/);
    expect(secretProblem({ NEXTAUTH_SECRET: GOOD })).toBeNull();
  });
});

describe('serverSettings', () => {
  it('listens on 127.0.0.1:3000 by default and on the configured host and port otherwise', () => {
    expect(serverSettings({ NEXTAUTH_SECRET: GOOD })).toEqual({
      settings: { host: '127.0.0.1', port: 3000, demo: false, migrate: true },
      problems: [],
    });
    expect(serverSettings({ NEXTAUTH_SECRET: GOOD, QUORUM_HOST: '10.1.2.3', PORT: '8080' }).settings).toMatchObject({
      host: '10.1.2.3',
      port: 8080,
    });
  });

  it('refuses to start without a real secret', () => {
    expect(serverSettings({}).problems).toEqual([expect.stringMatching(/NEXTAUTH_SECRET is not set/)]);
  });

  it('refuses the dev mailbox outside the demo, and a bad port', () => {
    const { problems } = serverSettings({ NEXTAUTH_SECRET: GOOD, QUORUM_DEV_MAILBOX: '1', PORT: '70000' });
    expect(problems).toEqual([expect.stringMatching(/QUORUM_DEV_MAILBOX=1 .* demo only/), expect.stringMatching(/PORT must be/)]);
    expect(serverSettings({ NEXTAUTH_SECRET: GOOD, QUORUM_DEV_MAILBOX: '1', QUORUM_DEMO: '1' }).problems).toEqual([]);
  });
});
