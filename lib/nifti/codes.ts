// Numeric codes of the NIfTI-1/-2 standard (nifti1.h / nifti2.h, NIfTI Data Format Working Group).

/** Datatype codes → name and bits per voxel (nifti1.h, "DT_*" / "NIFTI_TYPE_*" defines). */
export const DATATYPES: Record<number, { name: string; bitpix: number; supported: boolean }> = {
  1: { name: 'binary', bitpix: 1, supported: false },
  2: { name: 'uint8', bitpix: 8, supported: true },
  4: { name: 'int16', bitpix: 16, supported: true },
  8: { name: 'int32', bitpix: 32, supported: true },
  16: { name: 'float32', bitpix: 32, supported: true },
  32: { name: 'complex64', bitpix: 64, supported: false },
  64: { name: 'float64', bitpix: 64, supported: true },
  128: { name: 'rgb24', bitpix: 24, supported: false },
  256: { name: 'int8', bitpix: 8, supported: true },
  512: { name: 'uint16', bitpix: 16, supported: true },
  768: { name: 'uint32', bitpix: 32, supported: true },
  1024: { name: 'int64', bitpix: 64, supported: false },
  1280: { name: 'uint64', bitpix: 64, supported: false },
  1536: { name: 'float128', bitpix: 128, supported: false },
  1792: { name: 'complex128', bitpix: 128, supported: false },
  2048: { name: 'complex256', bitpix: 256, supported: false },
  2304: { name: 'rgba32', bitpix: 32, supported: false },
};

/** Datatype name → code, for the types this library reads. */
export const DATATYPE_CODES = {
  uint8: 2,
  int16: 4,
  int32: 8,
  float32: 16,
  float64: 64,
  int8: 256,
  uint16: 512,
  uint32: 768,
} as const;

/** Spatial unit codes (xyzt_units & 0x07), nifti1.h NIFTI_UNITS_*. */
export const SPACE_UNITS: Record<number, string> = { 0: 'unknown', 1: 'm', 2: 'mm', 3: 'um' };

/** Temporal unit codes (xyzt_units & 0x38), nifti1.h NIFTI_UNITS_*; value = seconds per unit. */
export const TIME_UNITS: Record<number, { name: string; seconds: number | null }> = {
  0: { name: 'unknown', seconds: null },
  8: { name: 's', seconds: 1 },
  16: { name: 'ms', seconds: 1e-3 },
  24: { name: 'us', seconds: 1e-6 },
  32: { name: 'hz', seconds: null },
  40: { name: 'ppm', seconds: null },
  48: { name: 'rad/s', seconds: null },
};

/** sizeof_hdr and the offset at which voxel data may start, per version (nifti1.h / nifti2.h). */
export const NIFTI1_HEADER_SIZE = 348;
export const NIFTI2_HEADER_SIZE = 540;
/** sizeof_hdr 348 read with the wrong byte order (0x5C010000). */
export const NIFTI1_SWAPPED = 1543569408;
/** sizeof_hdr 540 read with the wrong byte order (0x1C020000). */
export const NIFTI2_SWAPPED = 469893120;
