#!/usr/bin/python3
"""Regenerates the NIfTI-1 test fixtures and the values expected from them.

Run with Debian's Python (it has python3-nibabel and nifti-bin's nifti_tool):

    /usr/bin/python3 registration/src/test/resources/nifti/make_fixtures.py

It (1) copies a few small NIfTI test files shipped with nibabel into nibabel/ (MIT licence, see
nibabel/LICENSE-nibabel.txt), (2) writes small synthetic files with nibabel into made/ for the cases
nibabel ships none of (scaling, sform only, qform only with qfac -1, every readable datatype, an
unsupported datatype, header extensions, .hdr/.img pairs, a displacement field, units), and
(3) writes expected.json: for each file the values nibabel itself reports (shape, affine, datatype,
sum/min/max of frame 0 and a few voxels), or the error Turnmark must raise, and (4) copies the small valid files into the fuzz test's
seed corpus (../org/turnmark/registration/nifti/NiftiReaderFuzzTestInputs/). Affines are nibabel's
`img.affine` except where noted ('affine_source'): nibabel ignores xyzt_units and uses an ANALYZE
style base affine when no transform is set, and for the small-quaternion case the reference C
library (nifti_tool -disp_nim qto_xyz) is the reference.
"""
import gzip
import json
import os
import shutil
import struct
import subprocess

import numpy as np
import nibabel as nib

HERE = os.path.dirname(os.path.abspath(__file__))
NIB_DATA = os.path.join(os.path.dirname(nib.__file__), 'tests', 'data')
OUT_NIB = os.path.join(HERE, 'nibabel')
OUT_MADE = os.path.join(HERE, 'made')
RNG = np.random.default_rng(20261202)

expected = {}


def stats(img, frame=0):
    scaled = img.get_fdata(dtype=np.float64)
    if scaled.ndim >= 4:
        scaled = scaled[..., frame] if scaled.ndim == 4 else scaled[:, :, :, frame, ...]
    shape3 = scaled.shape[:3]
    idx = [(0, 0, 0), tuple(s - 1 for s in shape3), tuple(s // 2 for s in shape3), (shape3[0] - 1, 0, shape3[2] // 3)]
    voxels = []
    for ijk in idx:
        v = scaled[ijk]
        voxels.append({'ijk': list(map(int, ijk)), 'value': np.asarray(v, dtype=np.float64).tolist()})
    return {
        'sum': float(np.sum(scaled, dtype=np.float64)),
        'min': float(np.min(scaled)),
        'max': float(np.max(scaled)),
        'voxels': voxels,
        'stored_dtype': str(img.get_data_dtype().newbyteorder('=')),
    }


def record(name, path, frame=0, affine=None, affine_source='nibabel img.affine', transform=None, extra=None):
    img = nib.load(path)
    hdr = img.header
    e = {
        'file': name,
        'shape': [int(s) for s in img.shape],
        'affine': (img.affine if affine is None else affine).tolist(),
        'affine_source': affine_source,
        'endianness': 'big' if hdr.endianness == '>' else 'little',
        'frame': frame,
        'transform_source': transform,
    }
    e.update(stats(img, frame))
    if extra:
        e.update(extra)
    expected[name] = e


def reject(name, field, message_part, note):
    expected[name] = {'file': name, 'error_field': field, 'error_contains': message_part, 'note': note}


# ---------------------------------------------------------------------------------------------
# 1. nibabel's own test files
for f in ['example4d.nii.gz', 'anatomical.nii', 'functional.nii', 'standard.nii.gz',
          'reoriented_anat_moved.nii', 'analyze.hdr', 'nifti1.hdr']:
    shutil.copyfile(os.path.join(NIB_DATA, f), os.path.join(OUT_NIB, f))

# big-endian int16, qform and sform (code 2), qfac -1
record('nibabel/anatomical.nii', os.path.join(OUT_NIB, 'anatomical.nii'), transform='sform')
# little-endian int16 4-D; frame 1 read
record('nibabel/functional.nii', os.path.join(OUT_NIB, 'functional.nii'), frame=1, transform='sform')
# gzipped 4-D int16, qfac -1, oblique sform
record('nibabel/example4d.nii.gz', os.path.join(OUT_NIB, 'example4d.nii.gz'), frame=0, transform='sform')
# sform only (qform_code 0), uint8
record('nibabel/standard.nii.gz', os.path.join(OUT_NIB, 'standard.nii.gz'), transform='sform')
# big-endian float32
record('nibabel/reoriented_anat_moved.nii', os.path.join(OUT_NIB, 'reoriented_anat_moved.nii'), transform='sform')
reject('nibabel/analyze.hdr', 'magic', 'ANALYZE', 'ANALYZE 7.5 header without NIfTI magic')
reject('nibabel/nifti1.hdr', 'image file', 'nifti1.img', '.hdr whose .img is absent')


# ---------------------------------------------------------------------------------------------
# 2. synthetic fixtures made with nibabel
def rotation(axis, deg):
    axis = np.asarray(axis, float) / np.linalg.norm(axis)
    t = np.deg2rad(deg)
    k = np.array([[0, -axis[2], axis[1]], [axis[2], 0, -axis[0]], [-axis[1], axis[0], 0]])
    return np.eye(3) + np.sin(t) * k + (1 - np.cos(t)) * k @ k


def affine_of(rot, zooms, origin):
    a = np.eye(4)
    a[:3, :3] = rot @ np.diag(zooms)
    a[:3, 3] = origin
    return a


def made(name):
    return os.path.join(OUT_MADE, name)


shape = (5, 4, 3)

# Big-endian int16 with scl_slope/scl_inter, qform and sform equal (code 1).
aff = affine_of(rotation([0, 0, 1], 30), [0.9, 1.1, 2.5], [-40.5, 12.25, 7.0])
data = RNG.integers(-300, 300, size=shape).astype(np.int16)
img = nib.Nifti1Image(data, aff)
img.set_qform(aff, code=1)
img.set_sform(aff, code=1)
img.header.set_slope_inter(2.5, -10.0)
img.set_data_dtype(np.dtype('>i2'))
hdr = img.header.as_byteswapped('>')
img = nib.Nifti1Image(data, aff, header=hdr)
img.header.set_slope_inter(2.5, -10.0)
nib.save(img, made('big_endian_scaled.nii'))
record('made/big_endian_scaled.nii', made('big_endian_scaled.nii'), transform='sform')

# Scaled uint8, gzipped.
data = RNG.integers(0, 255, size=shape).astype(np.uint8)
img = nib.Nifti1Image(data, affine_of(np.eye(3), [2, 2, 2], [0, 0, 0]))
img.set_data_dtype(np.uint8)
img.header.set_slope_inter(0.5, 3.0)
nib.save(img, made('scaled_uint8.nii.gz'))
record('made/scaled_uint8.nii.gz', made('scaled_uint8.nii.gz'), transform='sform')

# sform only: oblique sform code 2, qform code 0.
aff = affine_of(rotation([1, 2, 3], 40), [1.5, 0.8, 1.2], [10, -20, 30])
img = nib.Nifti1Image(RNG.normal(100, 20, size=shape).astype(np.float32), None)
img.set_sform(aff, code=2)
img.set_qform(None, code=0)
nib.save(img, made('sform_only.nii.gz'))
record('made/sform_only.nii.gz', made('sform_only.nii.gz'), transform='sform')

# qform only with qfac = -1 (left-handed voxel grid): the usual radiological LAS storage.
aff = affine_of(rotation([0, 1, 1], 15) @ np.diag([-1, 1, 1]), [1.0, 1.25, 3.0], [90, -110, -60])
img = nib.Nifti1Image(RNG.normal(0, 1, size=shape).astype(np.float32), None)
img.set_qform(aff, code=1)
img.set_sform(None, code=0)
nib.save(img, made('qform_qfac_neg.nii'))
assert nib.load(made('qform_qfac_neg.nii')).header['pixdim'][0] == -1
record('made/qform_qfac_neg.nii', made('qform_qfac_neg.nii'), transform='qform')

# qform only, quaternion so close to 180 degrees that 1-(b^2+c^2+d^2) < 1e-7: the reference C
# library sets a = 0 and renormalises (b, c, d); nibabel does not, so nifti_tool is the reference.
img = nib.Nifti1Image(np.arange(np.prod(shape), dtype=np.float32).reshape(shape), np.eye(4))
img.set_qform(np.eye(4), code=1)
img.set_sform(None, code=0)
nib.save(img, made('qform_small_a.nii'))
# nibabel rewrites the quaternion from its affine on save, so the fields are patched in place at
# their nifti1.h offsets: pixdim[1..3] at 80, quatern_b/c/d at 256, qoffset_x/y/z at 268.
b, c, d = np.float32(0.6), np.float32(0.79999995), np.float32(0.0)
gap = 1.0 - (float(b) ** 2 + float(c) ** 2 + float(d) ** 2)
assert 0 < gap < 1e-7, gap
with open(made('qform_small_a.nii'), 'r+b') as f:
    f.seek(80)
    f.write(struct.pack('<3f', 200.0, 150.0, 100.0))  # large voxels make the rule visible
    f.seek(256)
    f.write(struct.pack('<6f', b, c, d, 100.0, -50.0, 25.0))
out = subprocess.run(['nifti_tool', '-disp_nim', '-field', 'qto_xyz', '-infiles', made('qform_small_a.nii')],
                     capture_output=True, text=True, check=True).stdout
vals = [float(v) for v in out.strip().splitlines()[-1].split()[3:]]
record('made/qform_small_a.nii', made('qform_small_a.nii'), transform='qform',
       affine=np.array(vals).reshape(4, 4), affine_source='nifti_tool -disp_nim qto_xyz (nifti1_io.c)')
expected['made/qform_small_a.nii']['nibabel_affine'] = nib.load(made('qform_small_a.nii')).affine.tolist()

# Units: micrometres. nibabel ignores xyzt_units; Turnmark converts to mm, so expected = affine/1000.
aff = affine_of(np.eye(3), [500, 500, 1000], [-1000, 2000, 3000])
img = nib.Nifti1Image(RNG.normal(0, 1, size=shape).astype(np.float32), aff)
img.header.set_xyzt_units(xyz='micron')
nib.save(img, made('units_um.nii'))
a = nib.load(made('units_um.nii')).affine.copy()
a[:3, :] /= 1000.0
record('made/units_um.nii', made('units_um.nii'), transform='sform', affine=a,
       affine_source='nibabel img.affine with rows 0-2 divided by 1000 (xyzt_units = micron)')

# One file per readable datatype, values spanning the type's range, qform = sform (code 1).
aff = affine_of(np.eye(3), [1, 2, 3], [4, 5, 6])
ranges = {'uint8': (0, 255), 'int8': (-128, 127), 'int16': (-32768, 32767), 'uint16': (0, 65535),
          'int32': (-2**31, 2**31 - 1), 'uint32': (0, 2**32 - 1)}
for t in ['uint8', 'int8', 'int16', 'uint16', 'int32', 'uint32', 'float32', 'float64']:
    if t in ranges:
        lo, hi = ranges[t]
        d = RNG.integers(lo, hi, size=shape, endpoint=True, dtype=np.int64).astype(t)
        d.flat[0], d.flat[1] = lo, hi
    else:
        d = RNG.normal(0, 1000, size=shape).astype(t)
    img = nib.Nifti1Image(d, aff)
    img.set_data_dtype(t)
    img.header.set_slope_inter(1.0, 0.0)
    nib.save(img, made('type_%s.nii' % t))
    record('made/type_%s.nii' % t, made('type_%s.nii' % t), transform='sform')

# An unsupported datatype must be rejected by name.
img = nib.Nifti1Image(np.ones(shape, dtype=np.complex64), aff)
nib.save(img, made('type_complex64.nii'))
reject('made/type_complex64.nii', 'datatype', 'complex64 (datatype 32) is not supported', 'complex data')

# A header extension: vox_offset moves past 352 and the reader must skip the extension.
img = nib.Nifti1Image(RNG.normal(5, 1, size=shape).astype(np.float32), aff)
img.header.extensions.append(nib.nifti1.Nifti1Extension('comment', b'synthetic test extension ' * 5))
nib.save(img, made('with_extension.nii'))
assert nib.load(made('with_extension.nii')).dataobj.offset > 352
record('made/with_extension.nii', made('with_extension.nii'), transform='sform',
       extra={'vox_offset': int(nib.load(made('with_extension.nii')).dataobj.offset)})

# .hdr/.img pair, plain and with the image gzipped.
img = nib.Nifti1Pair(RNG.normal(0, 3, size=shape).astype(np.float32), aff)
nib.save(img, made('pair.hdr'))
record('made/pair.hdr', made('pair.hdr'), transform='sform')
shutil.copyfile(made('pair.hdr'), made('pairgz.hdr'))
with open(made('pair.img'), 'rb') as src, gzip.GzipFile(made('pairgz.img.gz'), 'wb', mtime=0) as dst:
    dst.write(src.read())
expected['made/pairgz.hdr'] = dict(expected['made/pair.hdr'], file='made/pairgz.hdr')

# sform and qform both set but disagreeing by 2 mm: read the sform, warn.
aff = affine_of(np.eye(3), [1, 1, 1], [0, 0, 0])
img = nib.Nifti1Image(RNG.normal(0, 1, size=shape).astype(np.float32), aff)
img.set_sform(aff, code=1)
moved = aff.copy()
moved[0, 3] += 2.0
img.set_qform(moved, code=1)
nib.save(img, made('sform_qform_disagree.nii'))
record('made/sform_qform_disagree.nii', made('sform_qform_disagree.nii'), transform='sform',
       extra={'warning_contains': 'disagree'})

# A displacement field, 5-D, intent 1006, planar components, written by nibabel.
grid = affine_of(np.eye(3), [2, 2, 2], [-4, -3, -2])
u = RNG.normal(0, 1.5, size=shape + (1, 3)).astype(np.float32)
img = nib.Nifti1Image(u, grid)
img.header.set_intent('vector', (), name='test->ref')
img.header['intent_code'] = 1006
img.header.set_xyzt_units(xyz='mm')
nib.save(img, made('dispfield.nii.gz'))
d = nib.load(made('dispfield.nii.gz'))
comp = np.asanyarray(d.dataobj, dtype=np.float64)
expected['made/dispfield.nii.gz'] = {
    'file': 'made/dispfield.nii.gz', 'shape': list(map(int, d.shape)), 'affine': d.affine.tolist(),
    'affine_source': 'nibabel img.affine', 'transform_source': 'sform', 'intent_code': int(d.header['intent_code']),
    'component_sums': [float(comp[..., 0, c].sum()) for c in range(3)],
    'voxels': [{'ijk': [1, 2, 0], 'vector': comp[1, 2, 0, 0, :].tolist()},
               {'ijk': [4, 3, 2], 'vector': comp[4, 3, 2, 0, :].tolist()}],
}

# ---------------------------------------------------------------------------------------------
# 3. seed corpus of the fuzz test: small valid files of every kind the reader accepts
SEEDS = os.path.join(HERE, '..', 'org', 'turnmark', 'registration', 'nifti', 'NiftiReaderFuzzTestInputs',
                     'readerRaisesOnlyItsOwnError')
os.makedirs(SEEDS, exist_ok=True)
for f in ['big_endian_scaled.nii', 'scaled_uint8.nii.gz', 'sform_only.nii.gz', 'qform_qfac_neg.nii',
          'qform_small_a.nii', 'units_um.nii', 'type_int8.nii', 'type_uint16.nii', 'type_uint32.nii',
          'type_float64.nii', 'with_extension.nii', 'dispfield.nii.gz']:
    shutil.copyfile(made(f), os.path.join(SEEDS, 'seed-' + f))

with open(os.path.join(HERE, 'expected.json'), 'w') as f:
    json.dump(expected, f, indent=1, sort_keys=True)
    f.write('\n')
