/**
 * Runs in every integration test worker before the test file is imported: points
 * lib/db/config.ts (and so `db` from '@/lib/db/knex') at the test database prepared by
 * global-setup.ts.
 */
import { inject } from 'vitest';

const database = inject('quorumDatabase');
Object.assign(process.env, { NODE_ENV: 'test', QUORUM_DB_NAME: database.database });
