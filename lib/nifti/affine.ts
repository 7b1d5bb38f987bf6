// Conversions between the NIfTI quaternion form (qform) and a 4×4 affine, and small affine helpers.
// Source: nifti1.h, "METHOD 2" comment block, and the reference C library's
// nifti_quatern_to_mat44 / nifti_mat44_to_quatern (NIfTI Data Format Working Group).

export type Affine = number[][];

export interface Quaternion {
  b: number;
  c: number;
  d: number;
  qx: number;
  qy: number;
  qz: number;
  /** pixdim[0]: -1 flips the third axis (left-handed voxel grid), otherwise +1. */
  qfac: 1 | -1;
  /** voxel sizes along i, j, k (mm), positive. */
  dx: number;
  dy: number;
  dz: number;
}

/**
 * qform → 4×4 voxel-to-world affine (mm). a = sqrt(1 − b² − c² − d²); R is the rotation of the
 * unit quaternion (a, b, c, d); columns scaled by dx, dy, qfac·dz; translation (qx, qy, qz).
 * Source: nifti1.h METHOD 2. Returns row-major number[4][4].
 */
export function quaternionToAffine(q: Quaternion): Affine {
  let { b, c, d } = q;
  let a = 1 - (b * b + c * c + d * d);
  if (a < 1e-7) {
    // Numerically a 180° rotation: renormalise (b, c, d) and take a = 0, as the C library does.
    const n = Math.sqrt(b * b + c * c + d * d) || 1;
    b /= n;
    c /= n;
    d /= n;
    a = 0;
  } else {
    a = Math.sqrt(a);
  }
  const dx = q.dx > 0 ? q.dx : 1;
  const dy = q.dy > 0 ? q.dy : 1;
  const dz = (q.dz > 0 ? q.dz : 1) * (q.qfac < 0 ? -1 : 1);
  const r = [
    [a * a + b * b - c * c - d * d, 2 * (b * c - a * d), 2 * (b * d + a * c)],
    [2 * (b * c + a * d), a * a + c * c - b * b - d * d, 2 * (c * d - a * b)],
    [2 * (b * d - a * c), 2 * (c * d + a * b), a * a + d * d - c * c - b * b],
  ];
  return [
    [r[0][0] * dx, r[0][1] * dy, r[0][2] * dz, q.qx],
    [r[1][0] * dx, r[1][1] * dy, r[1][2] * dz, q.qy],
    [r[2][0] * dx, r[2][1] * dy, r[2][2] * dz, q.qz],
    [0, 0, 0, 1],
  ];
}

/**
 * 4×4 affine → qform, when its 3×3 part is a rotation (possibly with one reflection) times
 * positive voxel sizes. Returns null when the columns are not orthogonal within `tol` (shear),
 * i.e. when no qform can represent the affine. Source: nifti_mat44_to_quatern (reference C library).
 */
export function affineToQuaternion(m: Affine, tol = 1e-4): Quaternion | null {
  const col = (j: number) => [m[0][j], m[1][j], m[2][j]];
  const norm = (v: number[]) => Math.hypot(v[0], v[1], v[2]);
  const cols = [col(0), col(1), col(2)];
  const zooms = cols.map(norm);
  if (zooms.some((z) => !(z > 0) || !Number.isFinite(z))) return null;
  const u = cols.map((v, j) => v.map((x) => x / zooms[j]));
  const dot = (p: number[], q: number[]) => p[0] * q[0] + p[1] * q[1] + p[2] * q[2];
  if (Math.abs(dot(u[0], u[1])) > tol || Math.abs(dot(u[0], u[2])) > tol || Math.abs(dot(u[1], u[2])) > tol) {
    return null;
  }
  const det =
    u[0][0] * (u[1][1] * u[2][2] - u[1][2] * u[2][1]) -
    u[1][0] * (u[0][1] * u[2][2] - u[0][2] * u[2][1]) +
    u[2][0] * (u[0][1] * u[1][2] - u[0][2] * u[1][1]);
  const qfac: 1 | -1 = det < 0 ? -1 : 1;
  if (qfac < 0) u[2] = u[2].map((x) => -x);
  // r[i][j] = row i, column j of the proper rotation.
  const r = (i: number, j: number) => u[j][i];
  let a = r(0, 0) + r(1, 1) + r(2, 2) + 1;
  let b: number;
  let c: number;
  let d: number;
  if (a > 0.5) {
    a = 0.5 * Math.sqrt(a);
    b = (0.25 * (r(2, 1) - r(1, 2))) / a;
    c = (0.25 * (r(0, 2) - r(2, 0))) / a;
    d = (0.25 * (r(1, 0) - r(0, 1))) / a;
  } else {
    const xd = 1 + r(0, 0) - (r(1, 1) + r(2, 2));
    const yd = 1 + r(1, 1) - (r(0, 0) + r(2, 2));
    const zd = 1 + r(2, 2) - (r(0, 0) + r(1, 1));
    if (xd > 1) {
      b = 0.5 * Math.sqrt(xd);
      c = (0.25 * (r(0, 1) + r(1, 0))) / b;
      d = (0.25 * (r(0, 2) + r(2, 0))) / b;
      a = (0.25 * (r(2, 1) - r(1, 2))) / b;
    } else if (yd > 1) {
      c = 0.5 * Math.sqrt(yd);
      b = (0.25 * (r(0, 1) + r(1, 0))) / c;
      d = (0.25 * (r(1, 2) + r(2, 1))) / c;
      a = (0.25 * (r(0, 2) - r(2, 0))) / c;
    } else {
      d = 0.5 * Math.sqrt(zd);
      b = (0.25 * (r(0, 2) + r(2, 0))) / d;
      c = (0.25 * (r(1, 2) + r(2, 1))) / d;
      a = (0.25 * (r(1, 0) - r(0, 1))) / d;
    }
    if (a < 0) {
      b = -b;
      c = -c;
      d = -d;
    }
  }
  return { b, c, d, qx: m[0][3], qy: m[1][3], qz: m[2][3], qfac, dx: zooms[0], dy: zooms[1], dz: zooms[2] };
}

/** diag(pixdim[1..3], 1): the NIfTI "METHOD 1" voxel-to-world mapping (nifti1.h), in mm. */
export function diagonalAffine(pixdim: number[]): Affine {
  const p = (i: number) => (pixdim[i] && Number.isFinite(pixdim[i]) ? pixdim[i] : 1);
  return [
    [p(1), 0, 0, 0],
    [0, p(2), 0, 0],
    [0, 0, p(3), 0],
    [0, 0, 0, 1],
  ];
}

/** Largest absolute element-wise difference of two 4×4 affines. */
export function affineMaxDiff(a: Affine, b: Affine): number {
  let m = 0;
  for (let i = 0; i < 4; i++) for (let j = 0; j < 4; j++) m = Math.max(m, Math.abs(a[i][j] - b[i][j]));
  return m;
}
