import { execFileSync } from 'node:child_process';
import path from 'node:path';
import type { Page } from '@playwright/test';

export type E2eRun = { runId: number; decompositionId: number; componentIds: number[]; k: number };

/**
 * Creates a ready run in the browser tests' database (quorum_e2e) with its files under the e2e
 * server's uploads folder, assigned to the given demo raters (the way the worker leaves a run).
 */
export function createE2eRun(
  opts: {
    raters?: string[];
    size?: 'tiny' | 'small' | 'XS' | 'S';
    seed?: number;
    components?: number;
    withMotion?: boolean;
    reproducibility?: number[];
    restarts?: number;
  } = {},
): E2eRun {
  const root = process.cwd();
  const out = execFileSync('node', ['--import', 'tsx', 'tests/e2e/helpers/create-ready-run.ts', JSON.stringify(opts)], {
    cwd: root,
    env: {
      ...process.env,
      QUORUM_DB_NAME: process.env.QUORUM_DB_NAME ?? 'quorum_e2e',
      QUORUM_UPLOADS_DIR: process.env.QUORUM_UPLOADS_DIR ?? path.join(root, '.data/e2e-uploads'),
    },
    encoding: 'utf8',
    timeout: 120_000,
  });
  return JSON.parse(out.trim().split('\n').pop()!) as E2eRun;
}

/**
 * Colour statistics of a screenshot of an element, decoded in the page (no image package needed):
 * the number of distinct colours, and the share of pixels in the map's colours — saturated (max − min
 * channel > 60 of 255) and not the teal crosshair (green and blue both above red). The grey underlay,
 * the white letters and the dark background are not in that share. (Our own colour tables:
 * components/viewer/colormaps.ts.)
 */
async function screenshotColours(page: Page, selector: string): Promise<{ distinct: number; mapShare: number }> {
  const png = await page.locator(selector).screenshot();
  return page.evaluate(async (b64) => {
    const bmp = await createImageBitmap(await (await fetch(`data:image/png;base64,${b64}`)).blob());
    const c = document.createElement('canvas');
    c.width = bmp.width;
    c.height = bmp.height;
    const ctx = c.getContext('2d')!;
    ctx.drawImage(bmp, 0, 0);
    const d = ctx.getImageData(0, 0, c.width, c.height).data;
    const seen = new Set<number>();
    let map = 0;
    for (let i = 0; i < d.length; i += 4) {
      const [r, g, b] = [d[i], d[i + 1], d[i + 2]];
      seen.add((r << 16) | (g << 8) | b);
      if (Math.max(r, g, b) - Math.min(r, g, b) > 60 && !(g > r && b > r)) map++;
    }
    return { distinct: seen.size, mapShare: map / (d.length / 4) };
  }, png.toString('base64'));
}

/** Distinct colours in a screenshot of an element. */
export async function distinctColours(page: Page, selector: string): Promise<number> {
  return (await screenshotColours(page, selector)).distinct;
}

/** Share of an element's screenshot in the map's colours (see screenshotColours). */
export async function mapColourShare(page: Page, selector: string): Promise<number> {
  return (await screenshotColours(page, selector)).mapShare;
}

/** Every JSON value anywhere inside `value` whose key is `key`. */
export function findKey(value: unknown, key: string, out: unknown[] = []): unknown[] {
  if (Array.isArray(value)) value.forEach((v) => findKey(v, key, out));
  else if (value && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) {
      if (k === key) out.push(v);
      findKey(v, key, out);
    }
  }
  return out;
}
