/**
 * The route wrapper's request guards against the real route handler POST /api/account/tokens and
 * the real MariaDB (issue 13 items 1 and 3): a state-changing request from another site is refused
 * (403) and changes nothing; form posts and other non-JSON bodies on a JSON route get 415; a body
 * over 64 KB gets 413 before the rest of it is read. Same-site and header-less (program) requests
 * still work. Origin checking as OWASP's CSRF prevention cheat sheet describes it ("verifying
 * origin with standard headers"); 413/415 are RFC 9110 §15.5.14 and §15.5.16.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { randomBytes } from 'node:crypto';

const session = vi.hoisted(() => ({ current: null as null | { user: { id: number; sid: string; sv: number } } }));
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: async () => session.current,
}));

import { db } from '@/lib/db/knex';
import { MAX_JSON_BODY_BYTES } from '@/lib/api/request-guards';
import * as tokensRoute from '@/app/api/account/tokens/route';

const tag = randomBytes(3).toString('hex');
let userId = 0;
const url = 'http://localhost/api/account/tokens';
const noParams = { params: Promise.resolve({}) };

async function tokenCount(): Promise<number> {
  const row = await db('personal_access_tokens').where({ user_id: userId }).count({ n: '*' }).first();
  return Number(row?.n ?? 0);
}

async function post(init: RequestInit & { duplex?: 'half' }) {
  const res = await tokensRoute.POST(new Request(url, { method: 'POST', ...init }), noParams);
  return { status: res.status, json: await res.json() };
}

const json = (name: string) => ({ 'content-type': 'application/json', body: JSON.stringify({ name }) });

beforeAll(async () => {
  const [id] = await db('users').insert({
    email: `guards-${tag}@fernhollow.example`,
    name: `Guards ${tag}`,
    role: 'observer',
    active: true,
  });
  userId = Number(id);
  // a live session of a fresh account: session id, and session version 0 (lib/auth/session.ts)
  session.current = { user: { id: userId, sid: `guards-${tag}`, sv: 0 } };
});

afterAll(async () => {
  await db('personal_access_tokens').where({ user_id: userId }).delete();
  await db('users').where({ id: userId }).delete();
  await db.destroy();
});

describe('origin of state-changing requests', () => {
  it('refuses a POST whose Origin is another site, with a message saying why, and creates nothing', async () => {
    const before = await tokenCount();
    const { 'content-type': type, body } = json('forged');
    const r = await post({ headers: { 'content-type': type, origin: 'https://attacker.example' }, body });
    expect(r.status).toBe(403);
    expect(r.json.error.message).toMatch(/came from another site \(https:\/\/attacker\.example\)/);
    expect(await tokenCount()).toBe(before);
  });

  it('refuses when only the Referer names another site, and when the Origin is "null"', async () => {
    const { 'content-type': type, body } = json('forged');
    expect((await post({ headers: { 'content-type': type, referer: 'https://attacker.example/page' }, body })).status).toBe(403);
    expect((await post({ headers: { 'content-type': type, origin: 'null' }, body })).status).toBe(403);
  });

  it('accepts the same site (Origin or Referer) and programs that send neither', async () => {
    const before = await tokenCount();
    const { 'content-type': type, body } = json('same-site');
    expect((await post({ headers: { 'content-type': type, origin: 'http://localhost' }, body })).status).toBe(201);
    expect((await post({ headers: { 'content-type': type, referer: 'http://localhost/account' }, body })).status).toBe(201);
    expect((await post({ headers: { 'content-type': type }, body })).status).toBe(201);
    expect(await tokenCount()).toBe(before + 3);
  });

  it('leaves reads alone: a GET with a foreign Origin is answered', async () => {
    const res = await tokensRoute.GET(new Request(url, { headers: { origin: 'https://elsewhere.example' } }), noParams);
    expect(res.status).toBe(200);
  });
});

describe('body type and size', () => {
  it('answers a form post on a JSON route with 415 and creates nothing', async () => {
    const before = await tokenCount();
    const form = await post({ headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: 'name=forged' });
    expect(form.status).toBe(415);
    expect(form.json.error.message).toMatch(/takes JSON.*not application\/x-www-form-urlencoded/);
    const multipart = new FormData();
    multipart.set('name', 'forged');
    expect((await post({ body: multipart })).status).toBe(415);
    expect((await post({ headers: { 'content-type': 'text/plain' }, body: JSON.stringify({ name: 'forged' }) })).status).toBe(415);
    expect(await tokenCount()).toBe(before);
  });

  it('answers a body over 64 KB with 413, reading no more than the limit of a stream that would go on for 10 MB', async () => {
    const chunk = new TextEncoder().encode(' '.repeat(16 * 1024));
    let pulled = 0;
    const endless = new ReadableStream<Uint8Array>({
      pull(controller) {
        pulled++;
        if (pulled * chunk.byteLength > 10 * 1024 * 1024) controller.close();
        else controller.enqueue(chunk);
      },
    });
    const r = await post({ headers: { 'content-type': 'application/json' }, body: endless, duplex: 'half' });
    expect(r.status).toBe(413);
    expect(r.json.error.message).toMatch(/larger than 64 KB/);
    // at most the chunks that fit under the limit, one over it, and what the stream buffered ahead
    expect(pulled * chunk.byteLength).toBeLessThan(MAX_JSON_BODY_BYTES + 4 * chunk.byteLength);
  });

  it('answers a declared Content-Length over the limit with 413 before reading the body', async () => {
    let pulled = 0;
    const body = new ReadableStream<Uint8Array>({
      pull(controller) {
        pulled++;
        if (pulled > 128) controller.close();
        else controller.enqueue(new TextEncoder().encode(' '.repeat(1024)));
      },
    });
    const r = await post({
      headers: { 'content-type': 'application/json', 'content-length': String(MAX_JSON_BODY_BYTES + 1) },
      body,
      duplex: 'half',
    });
    expect(r.status).toBe(413);
    expect(pulled).toBeLessThanOrEqual(1); // a stream may pull once when it is created; the wrapper reads nothing
  });

  it('still takes a JSON body under the limit', async () => {
    expect(
      (await post({ headers: { 'content-type': 'application/json; charset=utf-8' }, body: JSON.stringify({ name: 'x'.repeat(100) }) }))
        .status,
    ).toBe(201);
  });
});
