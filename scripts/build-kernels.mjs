// Compiles the WebAssembly SIMD kernels (lib/decomposition/wasm/kernels.as.ts, AssemblyScript) to
// lib/decomposition/wasm/kernels.wasm with the `assemblyscript` npm package (nothing downloaded).
// `npm run build:kernels` runs it; the .wasm is committed, and tests/unit/wasm-kernels.test.ts fails
// when it differs from a fresh build of the source. `--check` only compares (exit 1 when stale).
import asc from 'assemblyscript/asc';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const source = 'lib/decomposition/wasm/kernels.as.ts';
const target = path.join(root, 'lib/decomposition/wasm/kernels.wasm');

/** Compiles the kernels' source; returns the .wasm bytes. */
export async function compileKernels() {
  let binary = null;
  const stderr = [];
  const { error } = await asc.main(
    [
      source,
      '--outFile',
      'kernels.wasm',
      '-O3',
      '--noAssert',
      '--runtime',
      'stub',
      '--enable',
      'simd,relaxed-simd',
      '--initialMemory',
      '2',
    ],
    {
      readFile: (name, baseDir) => {
        try {
          return readFileSync(path.resolve(root, baseDir, name), 'utf8');
        } catch {
          return null;
        }
      },
      writeFile: (name, contents) => {
        if (name.endsWith('.wasm')) binary = contents;
      },
      listFiles: () => [],
      stdout: { write: () => {} },
      stderr: { write: (s) => stderr.push(String(s)) },
    },
  );
  if (error || !binary) throw new Error(`AssemblyScript compile of ${source} failed: ${error?.message ?? ''}\n${stderr.join('')}`);
  return Buffer.from(binary);
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const fresh = await compileKernels();
  let current = null;
  try {
    current = readFileSync(target);
  } catch {
    /* missing */
  }
  const same = current !== null && Buffer.compare(current, fresh) === 0;
  if (process.argv.includes('--check')) {
    if (!same) {
      console.error(`${path.relative(root, target)} is out of date with ${source}; run npm run build:kernels and commit it.`);
      process.exit(1);
    }
    console.log(`${path.relative(root, target)} is up to date.`);
  } else if (same) {
    console.log(`${path.relative(root, target)} is up to date (${fresh.length} bytes).`);
  } else {
    writeFileSync(target, fresh);
    console.log(`wrote ${path.relative(root, target)} (${fresh.length} bytes)`);
  }
}
