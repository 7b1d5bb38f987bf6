// npm run bench [-- part…]: runs every scripts/bench/*.bench.ts (or the named parts) and prints figures.
// Benchmarks print numbers; they are not tests and never fail a build on speed.
import { readdirSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const here = path.dirname(fileURLToPath(import.meta.url));
const wanted = process.argv.slice(2);
const parts = readdirSync(here)
  .filter((f) => f.endsWith('.bench.ts'))
  .map((f) => f.replace(/\.bench\.ts$/, ''))
  .filter((name) => wanted.length === 0 || wanted.includes(name))
  .sort();

if (parts.length === 0) {
  console.error(`no benchmark part matches ${wanted.join(', ')}`);
  process.exit(2);
}
for (const name of parts) {
  console.log(`\n== bench: ${name} ==`);
  const mod = (await import(pathToFileURL(path.join(here, `${name}.bench.ts`)).href)) as {
    main: () => Promise<void>;
  };
  await mod.main();
}
