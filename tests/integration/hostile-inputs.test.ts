/**
 * Issue 13, hostile inputs: every route handler in app/api (found by walking the folder, so a new
 * route is covered without editing this file) and each method it exports gets malformed and huge
 * JSON, wrong types, unexpected fields (prototype keys too), form and multipart bodies, odd
 * unicode (lone surrogates, NUL, bidi overrides), long strings, and hostile path parameters and
 * query strings — signed in as a facility admin (the role that reaches furthest past the
 * permission check) and signed out. The answer is never a 5xx and never internal text (stack,
 * SQL, driver codes, file paths). Through the real handlers and MariaDB.
 */
import { readdirSync } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest';
import { actAs, currentSession } from '../e2e/helpers/route-call';

vi.mock('server-only', () => ({}));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: vi.fn(async () => currentSession()),
}));

const uploads = await mkdtemp(path.join(os.tmpdir(), 'quorum-hostile-'));
process.env.QUORUM_UPLOADS_DIR = uploads;

const { db, closeDb } = await import('@/lib/db/knex');
const { createUser } = await import('./helpers/factories');

const API = path.resolve(import.meta.dirname, '../../app/api');
const METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const;
// next-auth's own handler (sign-in, CSRF, callbacks) needs Next's request context; the browser
// tests (auth.spec.ts) send it malformed sign-in bodies
const SKIP = new Set(['auth/[...nextauth]/route.ts']);

function routeFiles(dir = API): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
    e.isDirectory() ? routeFiles(path.join(dir, e.name)) : e.name === 'route.ts' ? [path.relative(API, path.join(dir, e.name))] : [],
  );
}

type RouteFn = (req: Request, ctx: { params: Promise<Record<string, string | string[]>> }) => Promise<Response>;
type Target = { file: string; method: (typeof METHODS)[number]; fn: RouteFn; segments: string[] };

const LONE = 'a\ud800b\udc00c'; // two lone surrogates, each alone
const ODD_STRINGS = [
  LONE,
  '\u0000nul\u0000',
  '\u202eevil\u202c', // right-to-left override
  'e\u0301\u0301\u0301\u0301', // stacked combining marks
  '𝟙𝟚𝟛',
  'x'.repeat(60_000), // long, but under the 64 KB body cap
  "1' OR '1'='1",
  '../../../etc/passwd',
  '<script>alert(1)</script>',
  '=cmd|"/c calc"!A1',
];
const FIELD_NAMES = [
  'id',
  'name',
  'email',
  'password',
  'confirmPassword',
  'token',
  'role',
  'label',
  'noiseKind',
  'note',
  'reason',
  'notes',
  'componentId',
  'runId',
  'raterId',
  'raterIds',
  'baseVersion',
  'description',
  'studyRole',
  'active',
  'position',
  'items',
  'runs',
  'sub',
  'ses',
  'task',
];

type Body = { what: string; type?: string; raw: string | Uint8Array<ArrayBuffer> };
const json = (what: string, value: unknown): Body => ({ what, raw: JSON.stringify(value) });
function nested(depth: number): string {
  return '['.repeat(depth) + ']'.repeat(depth);
}
const BODIES: Body[] = [
  { what: 'malformed JSON', raw: '{"label": "noise",' },
  { what: 'not JSON at all', raw: 'label=noise' },
  { what: 'empty body', raw: '' },
  { what: 'JSON with a BOM', raw: '\ufeff{}' },
  { what: 'huge JSON (over the cap)', raw: JSON.stringify({ note: 'x'.repeat(200_000) }) },
  { what: 'deeply nested arrays', raw: nested(5_000) },
  json('null', null),
  json('a number', 42),
  json('a string', 'noise'),
  json('an array', [1, 2, 3]),
  json(
    'wrong types in every field',
    Object.fromEntries(FIELD_NAMES.map((k, i) => [k, [true, { $gt: 1 }, -1e309 === -Infinity ? 1e308 : 0, [], null][i % 5]])),
  ),
  { what: 'prototype keys', raw: '{"__proto__": {"role": "admin", "isAdmin": true}, "constructor": {"prototype": {"x": 1}}, "extra": 1}' },
  json('unexpected fields only', { unexpected: 1, alsoUnexpected: { deep: [1, 2] } }),
  json('huge numbers', Object.fromEntries(FIELD_NAMES.map((k) => [k, 1e308]))),
  ...ODD_STRINGS.map((s, i) => json(`odd strings #${i}`, Object.fromEntries(FIELD_NAMES.map((k) => [k, s])))),
  { what: 'escaped lone surrogates in JSON', raw: `{${FIELD_NAMES.map((k) => `"${k}":"\\udfff\\ud800"`).join(',')}}` },
  { what: 'invalid UTF-8 bytes', raw: new Uint8Array([0x7b, 0x22, 0x6e, 0x22, 0x3a, 0x22, 0xff, 0xfe, 0xc3, 0x28, 0x22, 0x7d]) },
  { what: 'a form body', type: 'application/x-www-form-urlencoded', raw: 'label=noise&reason=%F0%9F%98%80&email=a%40b.c' },
  {
    what: 'a multipart body',
    type: 'multipart/form-data; boundary=XyZ',
    raw: '--XyZ\r\nContent-Disposition: form-data; name="file"; filename="../../x.nii.gz"\r\n\r\nnot a nifti\r\n--XyZ--\r\n',
  },
  { what: 'JSON sent as text/plain', type: 'text/plain', raw: '{"label":"noise"}' },
];
const PARAMS = [
  '999999999',
  '-1',
  '0',
  '1.5',
  '1e309',
  'NaN',
  '99999999999999999999999',
  "1' OR 1=1",
  '..%2F..%2Fetc',
  '𝟙',
  LONE,
  'x'.repeat(5_000),
];
const QUERIES = [
  '',
  '?runId=abc&include=%3Cscript%3E&noiseKind=%ED%A0%80%FF',
  '?from=2026-99-99&to=not-a-date&limit=-5&offset=1e309&action=%00',
  `?q=${'x'.repeat(8_000)}&runId=1&runId=2`,
  '?__proto__[role]=admin&constructor=1',
];

/** Internal text that must never reach a client: stacks, SQL and driver codes, file paths, raw JS errors. */
const INTERNAL = [
  /\n\s+at \S+ \(|\bat \S+:\d+:\d+/,
  /\.(ts|js|mjs):\d+/,
  /node_modules/,
  /ECONN|ETIMEDOUT|EPIPE/,
  /\bER_[A-Z_]{3,}/,
  /\bSQL\b|syntax to use near|knex|mysql/i,
  /\/work\/|\/tmp\/|\/home\//,
  /TypeError|ReferenceError|SyntaxError|RangeError|Unexpected token|is not a function|Cannot read prop/,
];

function paramsFor(segments: string[], value: string): Record<string, string | string[]> {
  return Object.fromEntries(segments.map((s) => (s.startsWith('...') ? [s.slice(3), [value]] : [s, value])));
}

async function send(t: Target, opts: { body?: Body; params?: Record<string, string | string[]>; query?: string }) {
  const params = opts.params ?? paramsFor(t.segments, '999999999');
  const url = `http://localhost/api/${t.file.replace(/\/?route\.ts$/, '')}${opts.query ?? ''}`;
  const withBody = t.method !== 'GET' && opts.body;
  const req = new Request(url, {
    method: t.method,
    headers: withBody ? { 'content-type': opts.body!.type ?? 'application/json' } : {},
    body: withBody ? opts.body!.raw : undefined,
  });
  const res = await t.fn(req, { params: Promise.resolve(params) });
  const text = await res.text();
  return { status: res.status, text };
}

let problems: string[] = [];
function check(t: Target, what: string, r: { status: number; text: string }) {
  const where = `${t.method} ${t.file} — ${what}`;
  if (r.status >= 500) problems.push(`${where}: ${r.status} ${r.text.slice(0, 200)}`);
  const leak = INTERNAL.find((re) => re.test(r.text.slice(0, 20_000)));
  if (leak && !/\.nii|\.tsv|\.json|gzip/.test(t.file + what)) problems.push(`${where}: internal text ${leak} in ${r.text.slice(0, 200)}`);
}

const targets: Target[] = [];
let adminId: number;

beforeAll(async () => {
  adminId = await createUser(db, { role: 'admin' });
  for (const file of routeFiles()
    .filter((f) => !SKIP.has(f))
    .sort()) {
    const mod = (await import(path.join(API, file))) as Record<string, unknown>;
    const segments = [...file.matchAll(/\[([^\]]+)\]/g)].map((m) => m[1]);
    for (const method of METHODS)
      if (typeof mod[method] === 'function') targets.push({ file, method, fn: mod[method] as RouteFn, segments });
  }
});
afterAll(async () => {
  await closeDb();
  await rm(uploads, { recursive: true, force: true });
});

describe('hostile inputs on every route', () => {
  it('finds the routes (the walk itself works)', () => {
    expect(targets.length).toBeGreaterThanOrEqual(60);
    expect(targets.some((t) => t.file === 'runs/[id]/votes/[componentId]/route.ts' && t.method === 'PUT')).toBe(true);
  });

  beforeEach(() => {
    problems = [];
  });

  it('bodies: never a 5xx, never internal text (signed in as an admin)', async () => {
    actAs(adminId);
    for (const t of targets.filter((x) => x.method !== 'GET')) for (const body of BODIES) check(t, body.what, await send(t, { body }));
    expect(problems).toEqual([]);
  });

  it('path parameters and query strings: never a 5xx, never internal text', async () => {
    actAs(adminId);
    for (const t of targets) {
      for (const value of t.segments.length ? PARAMS : [])
        check(t, `param ${value.slice(0, 20)}`, await send(t, { params: paramsFor(t.segments, value), body: { what: '{}', raw: '{}' } }));
      for (const query of QUERIES) check(t, `query ${query.slice(0, 40)}`, await send(t, { query, body: { what: '{}', raw: '{}' } }));
    }
    expect(problems).toEqual([]);
  });

  it('signed out: every route answers 401 or its public answer, never a 5xx', async () => {
    actAs(null);
    for (const t of targets) for (const body of [BODIES[0], BODIES[10]]) check(t, `signed out, ${body.what}`, await send(t, { body }));
    expect(problems).toEqual([]);
  });
});
