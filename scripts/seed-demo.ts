/**
 * npm run seed – creates (or refreshes) the Fernhollow Imaging Core demo accounts and study in the
 * database of lib/db/config.ts (DATABASE_URL, else the private instance). Idempotent.
 * Run `npm run db start` and `npm run migrate` first.
 */
import { db, checkDatabase, closeDb } from '@/lib/db/knex';
import { resolveDbSettings } from '@/lib/db/config';
import { seedDemo, DEMO_PASSWORD, DEMO_USERS } from '@/db/seeds/demo';

async function main(): Promise<void> {
  const settings = resolveDbSettings();
  await checkDatabase(db, settings);
  const [{ n }] = await db('information_schema.tables').where({ table_schema: settings.database, table_name: 'users' }).count({ n: '*' });
  if (Number(n) === 0) throw new Error(`database \`${settings.database}\` has no schema yet — run \`npm run migrate\` first`);
  const result = await seedDemo(db);
  console.log(
    `seeded ${settings.displayUrl}: ${result.created.users} new of ${DEMO_USERS.length} accounts, study #${result.studyId}` +
      (result.created.study ? ' (created)' : ' (already there)'),
  );
  console.log(`demo accounts: ${DEMO_USERS.map((u) => `${u.email} (${u.role})`).join(', ')}; password ${DEMO_PASSWORD}`);
}

main()
  .then(() => closeDb())
  .catch(async (err: Error) => {
    console.error(`seed: ${err.message}`);
    await closeDb().catch(() => undefined);
    process.exit(1);
  });
