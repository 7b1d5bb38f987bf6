// `quorum header FILE [--summary]` – print a NIfTI file's header facts (and value summary) as JSON.
import { parseArgs } from 'node:util';
import { readNiftiFile, readNiftiHeaderFile, type NiftiHeader, type NiftiImage } from '@/lib/nifti';
import type { CliCommand } from './index';

const USAGE = 'usage: quorum header FILE [--summary]';

/** The header fields the command prints, in a stable order. */
function headerFacts(h: NiftiHeader) {
  return {
    version: h.version,
    dims: h.dims,
    pixdim: h.pixdim,
    datatype: h.datatype,
    datatypeCode: h.datatypeCode,
    bitpix: h.bitpix,
    littleEndian: h.littleEndian,
    voxOffset: h.voxOffset,
    sclSlope: h.sclSlope,
    sclInter: h.sclInter,
    spaceUnits: h.spaceUnits,
    timeUnits: h.timeUnits,
    trSeconds: h.trSeconds,
    qformCode: h.qformCode,
    sformCode: h.sformCode,
    affine: h.affine,
    description: h.description,
  };
}

/**
 * Min, max and mean of the finite scaled voxel values over all volumes (float64 accumulation),
 * and the count of NaN/±Inf voxels. Reads one volume at a time.
 */
export function valueSummary(img: NiftiImage): { min: number | null; max: number | null; mean: number | null; nonFinite: number } {
  let min = Infinity;
  let max = -Infinity;
  let sum = 0;
  let n = 0;
  let nonFinite = 0;
  const buf = new Float32Array(img.voxelsPerVolume);
  for (let t = 0; t < img.nt; t++) {
    img.readVolume(t, buf);
    for (let i = 0; i < buf.length; i++) {
      const x = buf[i];
      if (!Number.isFinite(x)) {
        nonFinite++;
        continue;
      }
      if (x < min) min = x;
      if (x > max) max = x;
      sum += x;
      n++;
    }
  }
  return n ? { min, max, mean: sum / n, nonFinite } : { min: null, max: null, mean: null, nonFinite };
}

export const header: CliCommand = {
  summary: 'print a NIfTI file header as JSON (--summary adds min/max/mean of the values)',
  usage: USAGE,
  async run(args) {
    try {
      const { values, positionals } = parseArgs({
        args,
        options: { summary: { type: 'boolean', default: false } },
        allowPositionals: true,
      });
      if (positionals.length !== 1) throw new Error(`expected exactly one FILE. ${USAGE}`);
      const [file] = positionals;
      let out: Record<string, unknown>;
      if (values.summary) {
        const img = await readNiftiFile(file);
        out = { ...headerFacts(img.header), summary: valueSummary(img) };
      } else {
        out = headerFacts(await readNiftiHeaderFile(file));
      }
      process.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
      return 0;
    } catch (err) {
      const e = err as NodeJS.ErrnoException;
      const message = e.code === 'ENOENT' ? `no such file: ${e.path}` : (e.message ?? String(err));
      process.stderr.write(`quorum header: ${message.split('\n')[0]}\n`);
      return 1;
    }
  },
};
