// Adds up the JSON reports of vitest and Playwright and the static checks (scripts/checks.sh:
// type-check, lint, dependency rule, dead exports — one passed or failed check each) and prints
// one line "N passed, N failed". A missing report counts as one failure, so a runner that never
// ran is visible.
import { existsSync, readFileSync } from 'node:fs';

let passed = 0;
let failed = 0;
let skipped = 0;
const notes = [];

function vitest(file) {
  if (!existsSync(file)) return (notes.push(`no vitest report at ${file}`), failed++);
  const r = JSON.parse(readFileSync(file, 'utf8'));
  passed += r.numPassedTests ?? 0;
  failed += r.numFailedTests ?? 0;
  skipped += (r.numPendingTests ?? 0) + (r.numTodoTests ?? 0);
  const brokenFiles = (r.testResults ?? []).filter((t) => t.status === 'failed' && (t.assertionResults ?? []).length === 0);
  if (brokenFiles.length) {
    failed += brokenFiles.length;
    notes.push(`${brokenFiles.length} test file(s) failed to load: ${brokenFiles.map((t) => t.name).join(', ')}`);
  }
}

function playwright(file) {
  if (!existsSync(file)) return (notes.push(`no Playwright report at ${file}`), failed++);
  const r = JSON.parse(readFileSync(file, 'utf8'));
  const s = r.stats ?? {};
  passed += (s.expected ?? 0) + (s.flaky ?? 0);
  failed += s.unexpected ?? 0;
  skipped += s.skipped ?? 0;
  for (const e of r.errors ?? []) notes.push(`Playwright: ${String(e.message ?? e).split('\n')[0]}`);
  failed += (r.errors ?? []).length;
}

function checks(file) {
  if (!existsSync(file)) return (notes.push(`no static-checks report at ${file}`), failed++);
  for (const [name, verdict] of Object.entries(JSON.parse(readFileSync(file, 'utf8')))) {
    if (verdict === 'passed') passed++;
    else {
      failed++;
      notes.push(`static check failed: ${name} (run \`npm run ${name}\`)`);
    }
  }
}

const [vitestFile, playwrightFile, build, checksArg] = process.argv.slice(2);
if (checksArg?.startsWith('checks=')) checks(checksArg.slice('checks='.length));
vitest(vitestFile);
if (build === 'build=ok') playwright(playwrightFile);
else {
  notes.push('production build failed: browser tests not run');
  failed++;
}

for (const n of notes) console.log(`note: ${n}`);
console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
process.exit(failed > 0 ? 1 : 0);
