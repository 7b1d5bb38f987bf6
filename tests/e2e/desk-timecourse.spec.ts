/**
 * The time course on the rating desk (issue 14): hovering shows the volume index and its
 * acquisition time, dragging across the chart zooms to that time range and "whole run" undoes it.
 * Checked against the run as stored: a kept volume t (0-based, after the dropped initial volumes)
 * is acquired at (dropped + t) · TR seconds (the NIfTI/BIDS convention that volume i starts at
 * i · RepetitionTime, BIDS specification "RepetitionTime"), so the first kept volume is number
 * `dropped` and the last is `dropped + n − 1`. The motion parameters' correlation with the time
 * course is Pearson's r (the sample correlation coefficient, computed here from its definition on
 * the run's stored series). Nothing here waits for a duration: each step waits for the state it
 * asserts.
 */
import { expect, test, type Page } from '@playwright/test';
import { DEMO, SignInPage } from './pages/sign-in-page';
import { DeskPage } from './pages/desk-page';
import { createE2eRun, type E2eRun } from './helpers/e2e-run';
import { sql } from './helpers/e2e-db';

let run: E2eRun;
let tr: number;
let dropped: number;
let n: number;

test.beforeAll(() => {
  run = createE2eRun({ raters: [DEMO.rater], size: 'small', seed: 47 });
  const row = sql<{ tr: number; parameters: unknown; summary: unknown; vols: number }>(
    `SELECT r.tr_seconds AS tr, d.parameters AS parameters, d.summary AS summary, r.volumes AS vols
       FROM runs r JOIN decompositions d ON d.run_id = r.id WHERE d.id = ${run.decompositionId}`,
  )[0]!;
  tr = Number(row.tr);
  // JSON columns come back as text or as objects depending on the driver's settings
  const json = (v: unknown) => (typeof v === 'string' ? JSON.parse(v) : (v ?? {})) as Record<string, unknown>;
  const parameters = json(row.parameters) as { drop?: number };
  const summary = json(row.summary) as { droppedVolumes?: number };
  dropped = Number(parameters.drop ?? summary.droppedVolumes ?? 0) || 0;
  n = Number(row.vols) - dropped;
});

/** The plot area of the time course (uPlot's overlay, where the cursor and the drag live). */
async function plotBox(page: Page) {
  const over = page.getByTestId('timecourse-chart').locator('.u-over');
  await expect(over).toBeVisible();
  await over.scrollIntoViewIfNeeded(); // the mouse reaches only what is in the viewport
  const box = await over.boundingBox();
  expect(box, 'the time course has a plot area').not.toBeNull();
  return box!;
}

/** The hover readout as numbers: volume index and seconds. */
async function hoverAt(page: Page, x: number, y: number) {
  await page.mouse.move(x, y);
  const readout = page.getByTestId('timecourse-hover');
  await expect(readout).toBeVisible();
  const text = (await readout.textContent()) ?? '';
  const m = /^volume (\d+) · (\d+\.\d) s · (-?\d+\.\d{3})$/.exec(text.trim());
  expect(m, `hover readout "${text}"`).not.toBeNull();
  return { volume: Number(m![1]), seconds: Number(m![2]) };
}

/** Signs in as the rater and opens the run's desk. */
async function openDesk(page: Page) {
  const signIn = new SignInPage(page);
  await signIn.open();
  await signIn.signIn(DEMO.rater);
  await expect(page.getByTestId('home-heading')).toBeVisible();
  const desk = new DeskPage(page);
  await desk.open(run.runId);
  return desk;
}

test('the time course shows the volume and its time on hover and zooms to a dragged range', async ({ page }) => {
  const desk = await openDesk(page);
  await expect(page.getByTestId('timecourse-chart')).toHaveAttribute('data-range', '');

  const box = await plotBox(page);
  const midY = box.y + box.height / 2;
  // the left edge of the plot is the first kept volume, the right edge the last
  const first = await hoverAt(page, box.x + 1, midY);
  expect(first.volume).toBe(dropped);
  expect(first.seconds).toBeCloseTo(dropped * tr, 1);
  const last = await hoverAt(page, box.x + box.width - 1, midY);
  expect(last.volume).toBe(dropped + n - 1);
  expect(last.seconds).toBeCloseTo((dropped + n - 1) * tr, 1);
  // in between: time is volume × TR
  const mid = await hoverAt(page, box.x + box.width / 2, midY);
  expect(mid.volume).toBeGreaterThan(dropped);
  expect(mid.volume).toBeLessThan(dropped + n - 1);
  expect(mid.seconds).toBeCloseTo(mid.volume * tr, 1);

  // drag from a quarter to three quarters of the run's time axis (x runs from 0 s to the last volume)
  const end = (dropped + n - 1) * tr;
  await page.mouse.move(box.x + box.width * 0.25, midY);
  await page.mouse.down();
  await page.mouse.move(box.x + box.width * 0.5, midY, { steps: 5 });
  await page.mouse.move(box.x + box.width * 0.75, midY, { steps: 5 });
  await page.mouse.up();
  const chart = page.getByTestId('timecourse-chart');
  await expect(chart).not.toHaveAttribute('data-range', '');
  const [a, b] = ((await chart.getAttribute('data-range')) ?? '').split('-').map(Number);
  // one pixel of the plot is end / width seconds; allow two
  const slack = (2 * end) / box.width + 0.05;
  expect(Math.abs(a - 0.25 * end)).toBeLessThanOrEqual(slack);
  expect(Math.abs(b - 0.75 * end)).toBeLessThanOrEqual(slack);
  await expect(page.getByTestId('timecourse-reset')).toBeVisible();
  // the plot now spans the range: its left edge is the first volume at or after a
  const zoomedBox = await plotBox(page);
  const left = await hoverAt(page, zoomedBox.x + 1, zoomedBox.y + zoomedBox.height / 2);
  expect(Math.abs(left.seconds - a)).toBeLessThanOrEqual(tr);

  // a new component keeps the rater's range; "whole run" returns to the whole run
  await desk.press('j');
  await expect(desk.position()).toHaveText(/^Component 2 of /);
  await expect(chart).toHaveAttribute('data-range', `${a.toFixed(1)}-${b.toFixed(1)}`);
  await page.getByTestId('timecourse-reset').click();
  await expect(chart).toHaveAttribute('data-range', '');
  await expect(page.getByTestId('timecourse-reset')).toHaveCount(0);
});

/** Pearson's r of two equally long series (its definition: covariance over the product of standard deviations); null when one does not vary. */
function pearsonR(a: number[], b: number[]): number | null {
  const mean = (v: number[]) => v.reduce((x, y) => x + y, 0) / v.length;
  const ma = mean(a);
  const mb = mean(b);
  let ab = 0;
  let aa = 0;
  let bb = 0;
  for (let i = 0; i < a.length; i++) {
    ab += (a[i]! - ma) * (b[i]! - mb);
    aa += (a[i]! - ma) ** 2;
    bb += (b[i]! - mb) ** 2;
  }
  return aa > 0 && bb > 0 ? ab / Math.sqrt(aa * bb) : null;
}

test('the framewise displacement is drawn; the six motion parameters show their r with each component’s time course', async ({ page }) => {
  const desk = await openDesk(page);
  await desk.press('Home'); // the desk reopens where the rater was (the test above moved on)
  await expect(desk.position()).toHaveText(/^Component 1 of /);
  await expect(page.getByTestId('motion-chart').locator('canvas')).toBeVisible();
  // the run as the components API gives it: motion per kept volume and each component's time course
  const res = await page.request.get(`/api/runs/${run.runId}/components`);
  expect(res.ok()).toBe(true);
  const payload = (await res.json()) as {
    run: { motion: { translations: number[][]; rotationsDeg: number[][] } | null };
    components: Array<{ timecourse: number[] }>;
  };
  const motion = payload.run.motion;
  expect(motion, 'the e2e run has a motion table').not.toBeNull();
  await expect(page.getByTestId('motion-traces')).toHaveCount(0);
  await page.getByTestId('motion-toggle').check();
  await expect(page.getByTestId('motion-traces').locator('canvas')).toHaveCount(2);
  for (const c of [0, 1]) {
    if (c === 1) {
      await desk.press('j');
      await expect(desk.position()).toHaveText(/^Component 2 of /);
    }
    const tc = payload.components[c]!.timecourse;
    for (const [group, series] of [
      ['motion-translations', motion!.translations],
      ['motion-rotations', motion!.rotationsDeg],
    ] as const) {
      for (const [i, ax] of (['x', 'y', 'z'] as const).entries()) {
        const r = pearsonR(series[i]!, tc);
        const shown = page.getByTestId(`${group}-r-${ax}`);
        if (r == null) {
          await expect(shown).toHaveText(`${ax} r —`);
          continue;
        }
        await expect(shown).toHaveText(new RegExp(`^${ax} r -?\\d\\.\\d{2}$`));
        // shown to two decimals; the desk reads the time course at float32, the API as JSON: half a unit of the last decimal, and a little
        await expect.poll(async () => Math.abs(Number((await shown.textContent())!.split(' r ')[1]) - r)).toBeLessThanOrEqual(0.0051);
      }
    }
  }
  await page.getByTestId('motion-toggle').uncheck();
  await expect(page.getByTestId('motion-traces')).toHaveCount(0);
});
