// Runs once when the server starts: says in one line when the database cannot be reached (the app
// still starts, and pages answer with a clear message until it is there).
export async function register() {
  if (process.env.NEXT_RUNTIME !== 'nodejs') return;
  const { checkDatabase } = await import('@/lib/db/knex');
  try {
    await checkDatabase();
  } catch (err) {
    console.error(`quorum: ${(err as Error).message}`);
  }
}
