import type { Niivue } from '@niivue/niivue';

type Vol = Niivue['volumes'][number];

/** One row of a 256-entry RGBA colour table sampled as the GPU does (linear filter, clamped to the edges), in 0..1. */
function sampleLut(lut: ArrayLike<number>, u: number, out: Float32Array) {
  const p = u * 256 - 0.5;
  const i0 = Math.floor(p);
  const t = p - i0;
  const a = Math.min(255, Math.max(0, i0)) * 4;
  const b = Math.min(255, Math.max(0, i0 + 1)) * 4;
  for (let c = 0; c < 4; c++) out[c] = (lut[a + c] * (1 - t) + lut[b + c] * t) / 255;
}

/**
 * The map layer's colours for one frame, computed on the CPU and written into the 3D texture the
 * viewer samples: the same arithmetic as Niivue's layer blend on the GPU (its "orient" fragment
 * shader for a scalar overlay, layer 1, over nothing: positive colour table above the threshold,
 * negative one below minus the threshold, opaque where a colour survives, times the opacity), on
 * the same grid as the underlay. In software WebGL the GPU blend renders the texture slice by
 * slice (one render pass each) and cost ≈ 35 ms a switch; this costs a few milliseconds.
 *
 * Covers only the desk's case — float32 maps on the underlay's grid, colour tables from zero off,
 * no modulation, a texture of the right size already made by Niivue — and returns false otherwise,
 * so the caller runs Niivue's own blend.
 */
export function blendMapsOnCpu(nv: Niivue): boolean {
  const back = nv.volumes[0] as Vol | undefined;
  const maps = nv.volumes[1] as Vol | undefined;
  const tex = nv.overlayTexture;
  if (!back || !maps || nv.volumes.length !== 2 || !tex || !maps.hdr || !maps.img) return false;
  const hdr = maps.hdr;
  const calMin = maps.cal_min;
  const calMax = maps.cal_max;
  if (calMin === undefined || calMax === undefined) return false;
  const dims = back.dimsRAS;
  const mdims = maps.dimsRAS;
  const step = maps.img2RASstep;
  const start = maps.img2RASstart;
  if (!dims || !mdims || !step || !start) return false;
  if (hdr.datatypeCode !== 16 || hdr.intent_code === 1002 || maps.colormapType !== 0 || maps.colormapLabel) return false;
  if (nv.opts.isAdditiveBlend || maps.modulationImage != null) return false;
  if (dims[1] !== mdims[1] || dims[2] !== mdims[2] || dims[3] !== mdims[3]) return false;
  const same = back.matRAS && maps.matRAS && Array.from(back.matRAS).every((v, i) => Math.abs(v - maps.matRAS![i]) < 1e-4);
  if (!same) return false;

  const [nx, ny, nz] = [dims[1], dims[2], dims[3]];
  const nVox = nx * ny * nz;
  const img = maps.img as Float32Array;
  const off = maps.frame4D * nVox;
  const slope = hdr.scl_slope;
  const inter = hdr.scl_inter;
  const posLut = nv.colormap(maps.colormap, maps.colormapInvert);
  const hasNeg = maps.colormapNegative.length > 0;
  const negLut = hasNeg ? nv.colormap(maps.colormapNegative, maps.colormapInvert) : posLut;
  // the shader's ranges: positive [cal_min, cal_max]; negative [−cal_max, −cal_min] unless set
  const rPos = Math.max(0.00001, Math.abs(calMax - calMin));
  const mnPos = Math.min(calMin, calMax);
  let mnNeg = Infinity;
  let mxNeg = -Infinity;
  if (hasNeg) {
    mnNeg = Math.min(-calMin, -calMax);
    mxNeg = Math.max(-calMin, -calMax);
    if (Number.isFinite(maps.cal_minNeg) && Number.isFinite(maps.cal_maxNeg)) {
      mnNeg = Math.min(maps.cal_minNeg, maps.cal_maxNeg);
      mxNeg = Math.max(maps.cal_minNeg, maps.cal_maxNeg);
    }
  }
  const rNeg = Math.max(0.00001, Math.abs(mxNeg - mnNeg));
  const opacity = maps.opacity;
  const out = new Uint8Array(nVox * 4);
  const c = new Float32Array(4);
  // every value at or below the positive range's start (outside the negative range) reads the
  // table's first entry, as the GPU's clamped sampling does: most voxels, computed once
  sampleLut(posLut, 0, c);
  const below = [...c.slice(0, 3), c[3] < 0.00001 ? 0 : opacity].map((v) => Math.round(v * 255));
  let o = 0;
  for (let z = 0; z < nz; z++) {
    const zi = start[2] + z * step[2];
    for (let y = 0; y < ny; y++) {
      const yi = start[1] + y * step[1];
      for (let x = 0; x < nx; x++, o += 4) {
        const f = slope * img[off + start[0] + x * step[0] + yi + zi] + inter;
        const negative = mnNeg < mxNeg && f < mxNeg;
        if (f <= mnPos && !negative) {
          out[o] = below[0];
          out[o + 1] = below[1];
          out[o + 2] = below[2];
          out[o + 3] = below[3];
          continue;
        }
        let txl = (f - mnPos) / rPos;
        if (f > mnPos) txl = Math.max(txl, 2 / 256);
        if (negative) {
          txl = Math.max(1 - (f - mnNeg) / rNeg, 2 / 256);
          sampleLut(negLut, txl, c);
        } else sampleLut(posLut, txl, c);
        const a = (c[3] < 0.00001 ? 0 : 1) * opacity;
        out[o] = Math.round(c[0] * 255);
        out[o + 1] = Math.round(c[1] * 255);
        out[o + 2] = Math.round(c[2] * 255);
        out[o + 3] = Math.round(a * 255);
      }
    }
  }
  const gl = nv.gl;
  gl.activeTexture(gl.TEXTURE2);
  gl.bindTexture(gl.TEXTURE_3D, tex);
  gl.pixelStorei(gl.UNPACK_ALIGNMENT, 1);
  gl.texSubImage3D(gl.TEXTURE_3D, 0, 0, 0, 0, nx, ny, nz, gl.RGBA, gl.UNSIGNED_BYTE, out);
  return true;
}
