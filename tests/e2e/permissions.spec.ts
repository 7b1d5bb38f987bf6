import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { expect, request as playwrightRequest, test } from '@playwright/test';
import { ROUTES, type Role } from './route-permissions';
import { apiSignIn, DEMO } from './pages/sign-in-page';

const API_DIR = path.resolve('app/api');

function routeFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = path.join(dir, name);
    if (statSync(full).isDirectory()) return routeFiles(full);
    return name === 'route.ts' ? [path.relative(API_DIR, full)] : [];
  });
}

function exportedMethods(file: string): string[] {
  const src = readFileSync(path.join(API_DIR, file), 'utf8');
  const found = new Set<string>();
  for (const m of src.matchAll(/export\s+(?:const|async function|function)\s+(GET|POST|PUT|PATCH|DELETE)\b/g)) found.add(m[1]);
  for (const m of src.matchAll(/\bas\s+(GET|POST|PUT|PATCH|DELETE)\b/g)) found.add(m[1]);
  return [...found];
}

test('every route handler in app/api is listed in the permission walk', () => {
  const listed = new Set(ROUTES.map((r) => `${r.method} ${r.file}`));
  const present = routeFiles(API_DIR).flatMap((f) => exportedMethods(f).map((m) => `${m} ${f.split(path.sep).join('/')}`));
  const missing = present.filter((p) => !listed.has(p));
  expect(missing, 'add these routes to tests/e2e/route-permissions.ts').toEqual([]);
  const stale = [...listed].filter((l) => !present.includes(l));
  expect(stale, 'these listed routes no longer exist').toEqual([]);
});

test('every route answers each role as the permission matrix says', async ({ baseURL }) => {
  const contexts = new Map<Role | 'anonymous', Awaited<ReturnType<typeof playwrightRequest.newContext>>>();
  contexts.set('anonymous', await playwrightRequest.newContext({ baseURL }));
  for (const role of ['admin', 'lead', 'rater', 'observer'] as Role[]) {
    const ctx = await playwrightRequest.newContext({ baseURL });
    await apiSignIn(ctx, DEMO[role]);
    contexts.set(role, ctx);
  }
  const failures: string[] = [];
  for (const route of ROUTES.filter((r) => r.allowed !== 'skip')) {
    for (const [who, ctx] of contexts) {
      const res = await ctx.fetch(route.url, {
        method: route.method,
        ...(route.method === 'GET' ? {} : { data: {}, headers: { 'content-type': 'application/json' } }),
        maxRedirects: 0,
      });
      const status = res.status();
      const allowed = route.allowed === 'public' || (who !== 'anonymous' && route.allowed.includes(who));
      const expected = allowed ? 'not 401/403' : who === 'anonymous' ? '401' : '403';
      const ok = allowed ? status !== 401 && status !== 403 && status < 500 : status === (who === 'anonymous' ? 401 : 403);
      if (!ok) failures.push(`${route.method} ${route.url} as ${who}: got ${status}, expected ${expected}`);
    }
  }
  for (const ctx of contexts.values()) await ctx.dispose();
  expect(failures).toEqual([]);
});
