// NIfTI-1 / NIfTI-2 reading and writing (.nii and .nii.gz), framework-free.
export { NiftiError, type NiftiErrorCode } from './errors';
export { encodeNifti1, writeNiftiFile, spatialFieldsOf, type NiftiWriteInput, type WritableDatatype } from './write';
export { parseNiftiHeader, imageSizes, type NiftiHeader } from './header';
export { decodeNifti, imageFromBytes, DEFAULT_MAX_VOXELS, type NiftiImage, type DecodeOptions } from './image';
export { readNiftiFile, readNiftiHeaderFile } from './read-file';
export { assertFourD, assertSameGrid } from './grid';
export { isGzip } from './gzip';
export { quaternionToAffine, affineToQuaternion, diagonalAffine, affineMaxDiff, type Affine, type Quaternion } from './affine';
export { DATATYPES, DATATYPE_CODES, SPACE_UNITS, TIME_UNITS } from './codes';
