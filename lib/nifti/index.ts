// NIfTI-1 / NIfTI-2 reading and writing (.nii and .nii.gz), framework-free.
export { NiftiError, type NiftiErrorCode } from './errors';
export { encodeNifti1, writeNiftiFile, type NiftiWriteInput, type WritableDatatype } from './write';
export { quaternionToAffine, affineToQuaternion, diagonalAffine, affineMaxDiff, type Affine, type Quaternion } from './affine';
