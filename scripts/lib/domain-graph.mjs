// Prints the import graph between domains (app, components, lib/<domain>; lib/db is one domain)
// and the cycles between them, from dependency-cruiser's JSON (`npm run -s deps:graph`).
// Type-only imports count too: a type is a dependency on the module that defines it.
import { execFileSync } from 'node:child_process';

const json = execFileSync(
  'npx',
  ['depcruise', 'app', 'components', 'lib', '--no-config', '-T', 'json', '--ts-pre-compilation-deps', '--ts-config', 'tsconfig.json'],
  {
    encoding: 'utf8',
    maxBuffer: 1 << 28,
  },
);
const domainOf = (p) => {
  if (p.startsWith('app/')) return 'app';
  if (p.startsWith('components/')) return 'components';
  const m = /^lib\/([^/.]+)/.exec(p);
  return m ? m[1] : null;
};
const edges = new Map();
for (const mod of JSON.parse(json).modules) {
  const from = domainOf(mod.source);
  if (!from) continue;
  for (const dep of mod.dependencies) {
    const to = domainOf(dep.resolved);
    if (!to || to === from) continue;
    if (!edges.has(from)) edges.set(from, new Set());
    edges.get(from).add(to);
  }
}
const names = [...edges.keys()].sort();
for (const n of names) console.log(`${n} → ${[...edges.get(n)].sort().join(', ')}`);
const pairs = [];
for (const a of names) for (const b of edges.get(a)) if (a < b && edges.get(b)?.has(a)) pairs.push(`${a} ↔ ${b}`);
console.log(`\ntwo-way pairs (${pairs.length}): ${pairs.join('; ') || 'none'}`);
