// Head-motion parameters of a run (T × 6 table uploaded by the lead) and framewise displacement.

/** Column order of an uploaded motion table: rx ry rz tx ty tz, or tx ty tz rx ry rz. */
export type MotionOrder = 'rot-first' | 'trans-first';

/** Rigid-body motion per volume: 3 translations (mm) and 3 rotations (radians), each length T. */
export interface MotionParams {
  translations: Float64Array[];
  rotations: Float64Array[];
}

export type MotionFileErrorCode = 'empty' | 'column_count' | 'row_count' | 'not_numeric' | 'bad_option';

/** Raised for a motion table that cannot be used; the message names the problem and the line. */
export class MotionFileError extends Error {
  readonly code: MotionFileErrorCode;
  /** 1-based line of the file where the problem was found, when it is tied to one line. */
  readonly line?: number;

  constructor(code: MotionFileErrorCode, message: string, line?: number) {
    super(message);
    this.name = 'MotionFileError';
    this.code = code;
    this.line = line;
  }
}

/**
 * Parses a motion table: one row per volume, 6 numeric columns separated by spaces, tabs or
 * commas (any mix). Blank lines and lines starting with '#' are skipped. `order` says which three
 * columns are rotations; `rotationUnits` converts degrees to radians (× π/180). When
 * `expectedRows` is given (the run's volume count), a different row count is refused.
 * Returns translations in mm and rotations in radians, each a Float64Array of length T.
 */
export function parseMotionFile(
  text: string,
  opts: { order: MotionOrder; rotationUnits: 'radians' | 'degrees'; expectedRows?: number },
): MotionParams {
  if (opts.order !== 'rot-first' && opts.order !== 'trans-first') {
    throw new MotionFileError('bad_option', `Motion column order must be 'rot-first' or 'trans-first', got '${String(opts.order)}'.`);
  }
  if (opts.rotationUnits !== 'radians' && opts.rotationUnits !== 'degrees') {
    throw new MotionFileError('bad_option', `Rotation units must be 'radians' or 'degrees', got '${String(opts.rotationUnits)}'.`);
  }
  // a cell is quoted back to the person, but never more than 40 characters of it (a 7 MB cell once was)
  const shownCell = (cell: string) => (cell.length > 40 ? `${cell.slice(0, 40)}… (${cell.length} characters)` : cell);
  const rows: number[][] = [];
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\r|\n/);
  let first = true;
  for (let li = 0; li < lines.length; li++) {
    const line = lines[li].trim();
    if (line === '' || line.startsWith('#')) continue;
    const lineNo = li + 1;
    const cells = line.split(/[\s,]+/).filter((c) => c !== '');
    // a first line of column names (e.g. "tx_mm ty_mm tz_mm rx_rad ry_rad rz_rad", as TSV tables carry) is a header
    const isHeader = first && cells.every((c) => !Number.isFinite(Number(c)) && /^[A-Za-z_][A-Za-z0-9_.()-]*$/.test(c));
    first = false;
    if (isHeader) continue;
    if (cells.length !== 6) {
      throw new MotionFileError(
        'column_count',
        `Motion file line ${lineNo} has ${cells.length} column${cells.length === 1 ? '' : 's'}, expected 6 (three rotations and three translations per volume).`,
        lineNo,
      );
    }
    const row = cells.map((cell, ci) => {
      const v = Number(cell);
      if (!Number.isFinite(v)) {
        throw new MotionFileError(
          'not_numeric',
          `Motion file line ${lineNo}, column ${ci + 1}: '${shownCell(cell)}' is not a number; the file must hold only numbers (a first line of column names and lines starting with '#' are skipped).`,
          lineNo,
        );
      }
      return v;
    });
    rows.push(row);
  }
  if (rows.length === 0) {
    throw new MotionFileError('empty', 'The motion file holds no rows; upload a table with one row of 6 numbers per volume.');
  }
  if (opts.expectedRows !== undefined && rows.length !== opts.expectedRows) {
    throw new MotionFileError(
      'row_count',
      `Motion file has ${rows.length} rows but the run has ${opts.expectedRows} volumes; upload the table for this run, with one row per volume (before any initial volumes are dropped).`,
    );
  }
  const t = rows.length;
  const rotScale = opts.rotationUnits === 'degrees' ? Math.PI / 180 : 1;
  const rotCol = opts.order === 'rot-first' ? 0 : 3;
  const transCol = opts.order === 'rot-first' ? 3 : 0;
  const translations = [0, 1, 2].map(() => new Float64Array(t));
  const rotations = [0, 1, 2].map(() => new Float64Array(t));
  for (let i = 0; i < t; i++) {
    for (let a = 0; a < 3; a++) {
      translations[a][i] = rows[i][transCol + a];
      rotations[a][i] = rows[i][rotCol + a] * rotScale;
    }
  }
  return { translations, rotations };
}

/** Number of volumes T of a motion table, after checking all six columns have the same length. */
export function motionLength(m: MotionParams): number {
  const cols = [...m.translations, ...m.rotations];
  if (m.translations.length !== 3 || m.rotations.length !== 3) {
    throw new MotionFileError('bad_option', 'Motion parameters must have 3 translation and 3 rotation columns.');
  }
  const t = cols[0].length;
  if (cols.some((c) => c.length !== t)) {
    throw new MotionFileError('bad_option', 'Motion parameter columns have different lengths; every column needs one value per volume.');
  }
  return t;
}

/**
 * Framewise displacement (Power et al. 2012, NeuroImage 59:2142):
 * FD_t = |Δtx| + |Δty| + |Δtz| + r·(|Δrx| + |Δry| + |Δrz|), Δ = value at t minus value at t−1,
 * rotations in radians turned into arc length on a sphere of radius r mm (default 50 mm, the
 * paper's approximate cortex-to-centre distance). FD_0 = 0. Returns mm, length T.
 */
export function framewiseDisplacement(m: MotionParams, radiusMm = 50): Float64Array {
  if (!Number.isFinite(radiusMm) || radiusMm <= 0) {
    throw new MotionFileError('bad_option', `Sphere radius for framewise displacement must be positive mm, got ${radiusMm}.`);
  }
  const t = motionLength(m);
  const fd = new Float64Array(t);
  for (let i = 1; i < t; i++) {
    let trans = 0;
    let rot = 0;
    for (let a = 0; a < 3; a++) {
      trans += Math.abs(m.translations[a][i] - m.translations[a][i - 1]);
      rot += Math.abs(m.rotations[a][i] - m.rotations[a][i - 1]);
    }
    fd[i] = trans + radiusMm * rot;
  }
  return fd;
}

/** Drops the first n volumes (the same dummy scans dropped from the run), returning copies. */
export function dropInitialVolumes(m: MotionParams, n: number): MotionParams {
  const t = motionLength(m);
  if (!Number.isInteger(n) || n < 0 || n >= t) {
    throw new MotionFileError(
      'bad_option',
      `Cannot drop ${n} initial volumes from a motion table of ${t} rows; choose a whole number from 0 to ${t - 1}.`,
    );
  }
  return {
    translations: m.translations.map((c) => c.slice(n)),
    rotations: m.rotations.map((c) => c.slice(n)),
  };
}
