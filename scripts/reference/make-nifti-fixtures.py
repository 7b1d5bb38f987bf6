#!/usr/bin/python3
"""Reference NIfTI fixtures for tests/unit/nifti-*.test.ts.

Writes tiny NIfTI-1 / NIfTI-2 files (every readable datatype, both byte orders, .nii and .nii.gz,
scl_slope/scl_inter, qform with qfac -1, sform with shear, time units ms and us, an extension,
NaN/Inf voxels) with headers built by nibabel, then re-reads each file with nibabel and records
its parsed facts and scaled voxel values in tests/fixtures/nifti/reference.json.
Also records the field offsets the standard's own C library tool (nifti_tool, Debian nifti-bin)
reports, in nifti-tool-offsets.json.

Run: /usr/bin/python3 scripts/reference/make-nifti-fixtures.py   (Debian python3-nibabel 5.0.0,
python3-numpy, nifti-bin). Tests read the outputs and need no Python.
"""
import gzip
import io
import json
import math
import os
import subprocess

import nibabel as nib
import numpy as np

OUT = os.path.join(os.path.dirname(__file__), '..', '..', 'tests', 'fixtures', 'nifti')
SHAPE = (5, 4, 3, 2)


def rot(theta_deg, axis):
    t = math.radians(theta_deg)
    c, s = math.cos(t), math.sin(t)
    if axis == 'z':
        return np.array([[c, -s, 0], [s, c, 0], [0, 0, 1]])
    if axis == 'x':
        return np.array([[1, 0, 0], [0, c, -s], [0, s, c]])
    return np.array([[c, 0, s], [0, 1, 0], [-s, 0, c]])


def affine_from(r, zooms, offset):
    a = np.eye(4)
    a[:3, :3] = r @ np.diag(zooms)
    a[:3, 3] = offset
    return a


def raw_values(dtype, n, rng):
    dt = np.dtype(dtype)
    if dt.kind == 'f':
        v = (rng.standard_normal(n) * 100).astype(dt)
        return v
    info = np.iinfo(dt)
    v = rng.integers(max(info.min, -2**31), min(info.max, 2**32 - 1), size=n, endpoint=True, dtype=np.int64)
    v[0], v[1] = info.min, info.max  # extremes of the type
    return v.astype(dt)


def write_case(name, version=1, dtype='int16', endian='<', gz=False, slope=None, inter=None,
               qform=None, qform_code=0, sform=None, sform_code=0, units=('mm', 'sec'),
               pixdim4=2.0, shape=SHAPE, extension=None, special=False, descrip='', seed=0):
    rng = np.random.default_rng(seed)
    hdr = (nib.Nifti1Header if version == 1 else nib.Nifti2Header)(endianness=endian)
    hdr.set_data_shape(shape)
    hdr.set_data_dtype(np.dtype(dtype))
    zooms = [2.0, 2.5, 3.0, pixdim4][:len(shape)]
    hdr.set_zooms(zooms)
    if qform is not None:
        hdr.set_qform(qform, code=qform_code)
    else:
        hdr['qform_code'] = qform_code
    if sform is not None:
        hdr.set_sform(sform, code=sform_code)
    else:
        hdr['sform_code'] = sform_code
    hdr.set_xyzt_units(*units)
    if slope is not None:
        hdr.set_slope_inter(slope, inter)
    if descrip:
        hdr['descrip'] = descrip
    if extension is not None:
        hdr.extensions.append(nib.nifti1.Nifti1Extension(6, extension))
    b = io.BytesIO()
    hdr.write_to(b)
    head = b.getvalue()
    offset = int(math.ceil(len(head) / 16.0) * 16)
    hdr.set_data_offset(offset)
    b = io.BytesIO()
    hdr.write_to(b)
    head = b.getvalue()
    head += b'\0' * (offset - len(head))
    n = int(np.prod(shape))
    vals = raw_values(dtype, n, rng)
    if special:
        vals[2], vals[3], vals[4] = np.nan, np.inf, -np.inf
    data = vals.astype(np.dtype(dtype).newbyteorder(endian)).reshape(shape, order='F').tobytes(order='F')
    payload = head + data
    fname = name + ('.nii.gz' if gz else '.nii')
    path = os.path.join(OUT, fname)
    if gz:
        payload = gzip.compress(payload, mtime=0)
    with open(path, 'wb') as f:
        f.write(payload)
    return fname


def enc(x):
    x = float(x)
    if math.isnan(x):
        return 'NaN'
    if math.isinf(x):
        return 'Infinity' if x > 0 else '-Infinity'
    return x


def facts(fname):
    img = nib.load(os.path.join(OUT, fname))
    h = img.header
    sp, tu = h.get_xyzt_units()
    vals = np.asanyarray(img.get_fdata(dtype=np.float64)).ravel(order='F')
    return {
        'file': fname,
        'version': 1 if isinstance(h, nib.Nifti1Header) and not isinstance(h, nib.Nifti2Header) else 2,
        'dims': [int(d) for d in img.shape],
        'pixdim': [float(p) for p in h['pixdim']],
        'datatypeCode': int(h['datatype']),
        'bitpix': int(h['bitpix']),
        'littleEndian': h.endianness == '<',
        'voxOffset': int(img.dataobj.offset),
        'sclSlope': float(img.dataobj.slope),
        'sclInter': float(img.dataobj.inter),
        'xyztUnits': int(h['xyzt_units']),
        'spaceUnits': sp,
        'timeUnits': tu,
        'qformCode': int(h['qform_code']),
        'sformCode': int(h['sform_code']),
        'qform': h.get_qform().tolist(),
        'sform': h.get_sform().tolist(),
        'bestAffine': h.get_best_affine().tolist(),
        'description': h['descrip'].item().decode('ascii'),
        'extensions': len(h.extensions),
        'values': [enc(v) for v in vals],
    }


def main():
    os.makedirs(OUT, exist_ok=True)
    for f in os.listdir(OUT):
        if f.endswith('.nii') or f.endswith('.nii.gz'):
            os.remove(os.path.join(OUT, f))
    q_rigid = affine_from(rot(20, 'z') @ rot(-10, 'x'), [2.0, 2.5, 3.0], [-40.5, 12.25, 8.0])
    # qfac -1: a reflection of the third axis (det < 0), as in radiological-order data.
    q_flip = affine_from(rot(15, 'y') @ np.diag([1, 1, -1]), [2.0, 2.5, 3.0], [10.0, -20.0, 30.0])
    s_shear = np.array([[2.0, 0.3, 0.1, -50.0], [0.2, 2.5, 0.0, 60.0], [0.0, 0.4, 3.0, -70.0], [0, 0, 0, 1]])
    cases = []
    for i, dt in enumerate(['uint8', 'int8', 'int16', 'uint16', 'int32', 'uint32', 'float32', 'float64']):
        cases.append(write_case(f'dtype-{dt}', dtype=dt, qform=q_rigid, qform_code=1, sform=q_rigid, sform_code=1, seed=i))
    cases.append(write_case('n1-int16-be', dtype='int16', endian='>', qform=q_rigid, qform_code=1, seed=10))
    cases.append(write_case('n1-float32-be', dtype='float32', endian='>', gz=True, sform=s_shear, sform_code=2, seed=11))
    cases.append(write_case('n1-float64-be', dtype='float64', endian='>', seed=12, descrip='big endian doubles'))
    cases.append(write_case('n2-int16-le', version=2, dtype='int16', qform=q_rigid, qform_code=1, seed=13))
    cases.append(write_case('n2-float32-le', version=2, dtype='float32', gz=True, sform=s_shear, sform_code=3, qform=q_flip, qform_code=1, seed=14))
    cases.append(write_case('n2-float64-be', version=2, dtype='float64', endian='>', qform=q_flip, qform_code=2, seed=15))
    cases.append(write_case('n2-uint16-be', version=2, dtype='uint16', endian='>', gz=True, slope=0.25, inter=10.0, seed=16))
    cases.append(write_case('scaled-int16', dtype='int16', slope=0.5, inter=-3.0, sform=q_rigid, sform_code=2, seed=17))
    cases.append(write_case('scaled-uint8-be', dtype='uint8', endian='>', slope=2.5, inter=100.0, seed=18))
    cases.append(write_case('qfac-neg', dtype='int16', qform=q_flip, qform_code=1, seed=19))
    cases.append(write_case('sform-shear', dtype='int16', sform=s_shear, sform_code=2, qform=q_rigid, qform_code=1, seed=20))
    cases.append(write_case('units-ms', dtype='int16', units=('mm', 'msec'), pixdim4=2000.0, seed=21))
    cases.append(write_case('units-us', dtype='float32', units=('micron', 'usec'), pixdim4=1500000.0, seed=22))
    cases.append(write_case('extension', dtype='int16', extension=b'quorum test comment extension', gz=True, qform=q_rigid, qform_code=1, seed=23))
    cases.append(write_case('nonfinite', dtype='float32', special=True, seed=24))
    cases.append(write_case('three-d', dtype='int16', shape=(5, 4, 3), seed=25, qform=q_rigid, qform_code=1))
    ref = {
        'generator': 'scripts/reference/make-nifti-fixtures.py',
        'library': f'nibabel {nib.__version__}, numpy {np.__version__}',
        'note': 'values are nibabel get_fdata() (float64) in file order, x fastest; NaN/Infinity as strings',
        'cases': [facts(c) for c in cases],
    }
    with open(os.path.join(OUT, 'reference.json'), 'w') as f:
        json.dump(ref, f, indent=1)

    # Field offsets as the standard's own C library reports them (nifti_tool -disp_hdr / -disp_hdr2).
    offsets = {'tool': subprocess.run(['nifti_tool', '-ver'], capture_output=True, text=True).stdout.strip()}
    for key, flag, fname in [('nifti1', '-disp_hdr1', 'dtype-int16.nii'), ('nifti2', '-disp_hdr2', 'n2-int16-le.nii')]:
        out = subprocess.run(['nifti_tool', flag, '-infiles', os.path.join(OUT, fname)], capture_output=True, text=True).stdout
        fields = {}
        for line in out.splitlines():
            parts = line.split()
            if len(parts) >= 3 and parts[1].isdigit() and parts[2].isdigit():
                fields[parts[0]] = {'offset': int(parts[1]), 'count': int(parts[2])}
        offsets[key] = fields
    with open(os.path.join(OUT, 'nifti-tool-offsets.json'), 'w') as f:
        json.dump(offsets, f, indent=1)
    print(f'wrote {len(cases)} images, reference.json and nifti-tool-offsets.json to {os.path.normpath(OUT)}')


if __name__ == '__main__':
    main()
