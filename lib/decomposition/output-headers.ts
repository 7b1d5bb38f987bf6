// Header fields of the decomposition's NIfTI outputs (components, mean, mask), taken from the run
// so the outputs sit on the run's grid with the run's own transforms and codes (nifti1.h, the
// NIfTI-1 standard of the NIfTI Data Format Working Group).
import { spatialFieldsOf, type NiftiHeader, type NiftiWriteInput } from '@/lib/nifti';

type RunHeader = Pick<NiftiHeader, 'pixdim' | 'affine' | 'qform' | 'qformCode' | 'sformCode' | 'xyztUnits'>;
type SpatialFields = Pick<NiftiWriteInput, 'pixdim' | 'affine' | 'sformCode' | 'qformCode' | 'qformAffine' | 'xyztUnits'>;

/** Spatial units bits of xyzt_units (nifti1.h: XYZT_TO_SPACE, mask 0x07); time bits (0x38) cleared. */
const spaceUnits = (xyztUnits: number) => xyztUnits & 0x07;

/**
 * 3D outputs (mean image, mask): the run's voxel sizes, sform and qform with their codes unchanged
 * (a run from a DICOM converter with qform_code = sform_code = 1, scanner anatomical, stays 1 —
 * relabelling it 2, aligned anatomical, would claim a registration that never happened), and the
 * run's spatial units.
 */
export function volumeHeaderFields(h: RunHeader): SpatialFields {
  return {
    pixdim: [1, 2, 3].map((i) => h.pixdim[i] ?? 1),
    ...spatialFieldsOf(h),
    xyztUnits: spaceUnits(h.xyztUnits),
  };
}

/**
 * The 4D component maps: as volumeHeaderFields, with the component number on dim[4]. nifti1.h
 * reserves dim[4] for time and dim[5] for "multiple values at each spatiotemporal voxel"; strictly
 * a stack of maps would go on dim[5] with dim[4] = 1, but most readers (our own reader and the
 * desk's viewer included) page through volumes along dim[4] only. So we keep the maps on dim[4]
 * and do not label that axis as time: the time bits of xyzt_units are NIFTI_UNITS_UNKNOWN (0), so
 * pixdim[4] carries no unit, and pixdim[4] = 1 because nifti1.h requires pixdim[i] positive for
 * i ≤ dim[0] ("one component per step"); toffset stays 0. intent_code NIFTI_INTENT_ZSCORE (5)
 * says the values are z-scores.
 */
export function componentsHeaderFields(h: RunHeader): SpatialFields & Pick<NiftiWriteInput, 'intentCode'> {
  const v = volumeHeaderFields(h);
  return { ...v, pixdim: [...v.pixdim!, 1], xyztUnits: spaceUnits(h.xyztUnits), intentCode: 5 };
}
