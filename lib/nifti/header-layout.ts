// Byte offsets of header fields. Source: nifti1.h (348-byte nifti_1_header) and nifti2.h
// (540-byte nifti_2_header), NIfTI Data Format Working Group; offsets recalled from the structs
// (from memory) and cross-checked against nibabel 5.0.0 in tests/unit/nifti-layout.test.ts.

/** NIfTI-1 field offsets (bytes from file start). */
export const N1 = {
  sizeof_hdr: 0,
  regular: 38,
  dim_info: 39,
  dim: 40, // short[8]
  intent_p1: 56,
  intent_code: 68,
  datatype: 70,
  bitpix: 72,
  pixdim: 76, // float[8]
  vox_offset: 108,
  scl_slope: 112,
  scl_inter: 116,
  xyzt_units: 123,
  descrip: 148, // char[80]
  aux_file: 228,
  qform_code: 252,
  sform_code: 254,
  quatern_b: 256,
  quatern_c: 260,
  quatern_d: 264,
  qoffset_x: 268,
  qoffset_y: 272,
  qoffset_z: 276,
  srow_x: 280, // float[4]
  srow_y: 296,
  srow_z: 312,
  intent_name: 328, // char[16]
  magic: 344, // char[4]
} as const;

/** NIfTI-2 field offsets (bytes from file start). */
export const N2 = {
  sizeof_hdr: 0,
  magic: 4, // char[8]
  datatype: 12,
  bitpix: 14,
  dim: 16, // int64[8]
  intent_p1: 80,
  pixdim: 104, // double[8]
  vox_offset: 168, // int64
  scl_slope: 176,
  scl_inter: 184,
  descrip: 240, // char[80]
  aux_file: 320,
  qform_code: 344, // int32
  sform_code: 348,
  quatern_b: 352, // double
  quatern_c: 360,
  quatern_d: 368,
  qoffset_x: 376,
  qoffset_y: 384,
  qoffset_z: 392,
  srow_x: 400, // double[4]
  srow_y: 432,
  srow_z: 464,
  slice_code: 496,
  xyzt_units: 500, // int32
  intent_code: 504, // int32
  intent_name: 508, // char[16]
  dim_info: 524,
} as const;
