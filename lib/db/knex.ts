/**
 * The one knex instance of the application (`import { db } from '@/lib/db/knex'`).
 * In development it is kept on globalThis so hot reloads do not open new pools.
 *
 * Conventions (MariaDB, not Postgres): no `.returning()` — read the inserted id back
 * (`const [id] = await db('users').insert(row)`); booleans are TINYINT(1) and arrive as JS
 * booleans (see typeCast in ./config); JSON columns arrive parsed (mysql2 reads MariaDB's "json"
 * column format) — still read them through `parseJson`, which also accepts strings, and write
 * them with `toJson`; DATETIME(3) columns are UTC and arrive as Date objects.
 */
import knex, { type Knex } from 'knex';
import { connectionOptions, knexLog, poolOptions, resolveDbSettings, unreachableMessage, type DbSettings } from './config';

/** Creates a separate knex instance (scripts and tests that need another database). */
export function createDb(settings: DbSettings = resolveDbSettings()): Knex {
  return knex({
    client: 'mysql2',
    connection: connectionOptions(settings),
    pool: poolOptions,
    log: knexLog,
    acquireConnectionTimeout: 10_000,
  });
}

const globalForDb = globalThis as unknown as { __quorumDb?: Knex };

export const db: Knex = globalForDb.__quorumDb ?? createDb();
if (process.env.NODE_ENV !== 'production') globalForDb.__quorumDb = db;

/** Closes the shared pool (end of a script or test file). */
export async function closeDb(): Promise<void> {
  await db.destroy();
  if (globalForDb.__quorumDb === db) delete globalForDb.__quorumDb;
}

const UNREACHABLE = new Set(['ECONNREFUSED', 'ENOTFOUND', 'EHOSTUNREACH', 'ETIMEDOUT', 'ECONNRESET', 'EAI_AGAIN']);

/**
 * Checks that the database answers. Throws an Error with one clear line:
 * "Cannot reach MariaDB at 127.0.0.1:3366 — start it with `npm run db start` (or set DATABASE_URL)",
 * or says the database or the credentials are wrong.
 */
export async function checkDatabase(conn: Knex = db, settings: DbSettings = resolveDbSettings()): Promise<void> {
  try {
    await conn.raw('SELECT 1');
  } catch (err) {
    const e = err as { code?: string; errno?: number; name?: string };
    let message: string;
    if (e.code === 'ER_BAD_DB_ERROR') {
      message = `MariaDB at ${settings.host}:${settings.port} has no database \`${settings.database}\` — run \`npm run db start\` (or \`npm run db reset\`) and \`npm run migrate\``;
    } else if (e.code === 'ER_ACCESS_DENIED_ERROR' || e.code === 'ER_DBACCESS_DENIED_ERROR') {
      message = `MariaDB at ${settings.host}:${settings.port} refused user ${settings.user} for \`${settings.database}\` — check DATABASE_URL or run \`npm run db start\``;
    } else if ((e.code && UNREACHABLE.has(e.code)) || e.name === 'KnexTimeoutError') {
      message = unreachableMessage(settings);
    } else {
      message = `MariaDB at ${settings.host}:${settings.port} failed: ${(err as Error).message.split('\n')[0]}`;
    }
    throw new Error(message, { cause: err });
  }
}

/**
 * Reads a JSON value: values mysql2 already parsed pass through; strings (JSON held in TEXT,
 * GROUP_CONCAT, drivers without MariaDB's format metadata) and Buffers are parsed;
 * SQL NULL gives `fallback`.
 */
export function parseJson<T = unknown>(value: unknown, fallback: T | null = null): T | null {
  if (value === null || value === undefined) return fallback;
  if (Buffer.isBuffer(value)) value = value.toString('utf8');
  if (typeof value === 'string') return value === '' ? fallback : (JSON.parse(value) as T);
  return value as T;
}

/** Serialises a value for a JSON column (knex would otherwise send objects as `[object Object]`). */
export function toJson(value: unknown): string | null {
  return value === undefined || value === null ? null : JSON.stringify(value);
}

/** Float32Array → little-endian bytes for a LONGBLOB column (time courses, spectra). */
export function float32ToBlob(values: Float32Array | number[]): Buffer {
  const arr = values instanceof Float32Array ? values : Float32Array.from(values);
  const buf = Buffer.alloc(arr.length * 4);
  for (let i = 0; i < arr.length; i++) buf.writeFloatLE(arr[i], i * 4);
  return buf;
}

/** Little-endian float32 bytes from a LONGBLOB column → Float32Array (null stays null). */
export function blobToFloat32(blob: Buffer | Uint8Array | null | undefined): Float32Array | null {
  if (!blob) return null;
  if (blob.byteLength % 4 !== 0) throw new Error(`float32 blob length ${blob.byteLength} is not a multiple of 4`);
  const out = new Float32Array(blob.byteLength / 4);
  const view = new DataView(blob.buffer, blob.byteOffset, blob.byteLength);
  for (let i = 0; i < out.length; i++) out[i] = view.getFloat32(i * 4, true);
  return out;
}
