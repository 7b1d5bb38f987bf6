import { execFileSync } from 'node:child_process';

/**
 * A look into the browser tests' database (QUORUM_DB_NAME, default quorum_e2e) through the
 * project's own knex settings: runs one SQL statement and returns its rows.
 */
export function sql<T = Record<string, unknown>>(query: string): T[] {
  const out = execFileSync(
    'node',
    [
      '--import',
      'tsx',
      '-e',
      `import('./lib/db/knex.ts').then(async ({ createDb }) => {
        const db = createDb();
        const [rows] = await db.raw(${JSON.stringify(query)});
        process.stdout.write(JSON.stringify(rows));
        await db.destroy();
      });`,
    ],
    { env: { ...process.env, QUORUM_DB_NAME: process.env.QUORUM_DB_NAME ?? 'quorum_e2e' }, encoding: 'utf8' },
  );
  return JSON.parse(out) as T[];
}
