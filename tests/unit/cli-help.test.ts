// Every command-line entry point answers --help with its usage on stdout and exit 0, and an unknown
// option with one line and the usage on stderr, never a stack trace (issue 15 item 12).
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { commands } from '@/scripts/cli/index';

const ROOT = path.resolve(__dirname, '../..');

function run(script: string, args: string[]) {
  const r = spawnSync(process.execPath, ['--conditions=react-server', '--import', 'tsx', script, ...args], { cwd: ROOT, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

describe('--help', () => {
  it.each(Object.keys(commands))('quorum %s --help prints its usage', (name) => {
    const r = run('scripts/quorum.ts', [name, '--help']);
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    expect(r.out).toContain(`usage: quorum ${name}`);
  });

  it('quorum --help lists the commands', () => {
    const r = run('scripts/quorum.ts', ['--help']);
    expect(r.code).toBe(0);
    for (const name of Object.keys(commands)) expect(r.out).toContain(`  ${name}`);
  });

  it('demo-data --help prints its usage; an unknown option is one line and the usage, no stack trace', () => {
    const help = run('scripts/make-demo-data.ts', ['--help']);
    expect(help.code).toBe(0);
    expect(help.out).toContain('usage: npm run -s demo-data -- --out DIR');
    const bad = run('scripts/make-demo-data.ts', ['--bogus']);
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/^make-demo-data: Unknown option '--bogus'\.\nusage: /);
    expect(bad.err).not.toMatch(/\n\s+at /);
  });
});
