/**
 * The desk's mosaic of axial slices: how many columns and rows fill the viewer best, and where the
 * slices lie (mm). Used by the desk and Reconcile, so both show the same arrangement.
 */
export type MosaicPlan = { cols: number; rows: number; slicesMm: number[] };

/**
 * Picks columns × rows (between `minSlices` and `maxSlices` tiles, every tile used) so that the
 * tiles cover as much of a `viewW` × `viewH` pixel area as possible, for slices `sliceW` × `sliceH`
 * mm (the axial field of view). Ties go to more slices. Slices are spread evenly inside
 * [zMin, zMax] mm (inferior → superior), ends excluded, rounded to 0.1 mm.
 */
export function planMosaic({
  viewW,
  viewH,
  sliceW,
  sliceH,
  zMin,
  zMax,
  minSlices = 12,
  maxSlices = 30,
}: {
  viewW: number;
  viewH: number;
  sliceW: number;
  sliceH: number;
  zMin: number;
  zMax: number;
  minSlices?: number;
  maxSlices?: number;
}): MosaicPlan {
  let best = { cols: 4, rows: 3, cover: -1 };
  if (viewW > 0 && viewH > 0 && sliceW > 0 && sliceH > 0) {
    for (let cols = 1; cols <= maxSlices; cols++) {
      for (let rows = 1; rows * cols <= maxSlices; rows++) {
        if (rows * cols < minSlices) continue;
        const scale = Math.min(viewW / (cols * sliceW), viewH / (rows * sliceH));
        const cover = (rows * cols * sliceW * sliceH * scale * scale) / (viewW * viewH);
        const better = cover > best.cover + 1e-9 || (Math.abs(cover - best.cover) <= 1e-9 && rows * cols > best.cols * best.rows);
        if (better) best = { cols, rows, cover };
      }
    }
  }
  const n = best.cols * best.rows;
  const slicesMm = Array.from({ length: n }, (_, i) => Math.round((zMin + ((i + 1) * (zMax - zMin)) / (n + 1)) * 10) / 10);
  return { cols: best.cols, rows: best.rows, slicesMm };
}

/** The plan as the viewer's mosaic string: axial rows of slice positions in mm, labels on, the top row the most superior. */
export function mosaicSpec(plan: MosaicPlan): string {
  const rows: string[] = [];
  const top = [...plan.slicesMm].reverse();
  for (let r = 0; r < plan.rows; r++)
    rows.push(
      `A ${top
        .slice(r * plan.cols, (r + 1) * plan.cols)
        .map((z) => z.toFixed(1))
        .join(' ')}`,
    );
  return `L+ ${rows.join(' ; ')}`;
}
