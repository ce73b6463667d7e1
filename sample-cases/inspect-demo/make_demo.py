#!/usr/bin/python3
"""Makes demo.nii.gz, the invented image behind the README quick start (`turnmark inspect`).

Synthetic content only: a smooth ellipsoidal "tissue" region with a small bright sphere in a
48 x 40 x 32 grid of 2.5 mm voxels, int16, gzipped, written with Debian's python3-nibabel:

    /usr/bin/python3 sample-cases/inspect-demo/make_demo.py
"""
import os

import numpy as np
import nibabel as nib

HERE = os.path.dirname(os.path.abspath(__file__))
rng = np.random.default_rng(7)
shape = (48, 40, 32)
spacing = 2.5
affine = np.diag([spacing, spacing, spacing, 1.0])
affine[:3, 3] = [-(shape[0] - 1) * spacing / 2, -30.0, -(shape[2] - 1) * spacing / 2]

i, j, k = np.meshgrid(*[np.arange(n) for n in shape], indexing='ij')
x, y, z = (affine[:3, :3] @ np.stack([i, j, k]).reshape(3, -1)).reshape(3, *shape) + affine[:3, 3, None, None, None]
tissue = ((x / 50.0) ** 2 + ((y - 10.0) / 40.0) ** 2 + (z / 35.0) ** 2) < 1.0
lesion = ((x - 12.0) ** 2 + (y - 20.0) ** 2 + (z - 5.0) ** 2) < 6.0 ** 2
img = 40.0 + 400.0 * tissue + 500.0 * lesion + 10.0 * np.sin(x / 7.0) * np.cos(z / 9.0)
img += rng.normal(0.0, 1.0, size=shape)
data = np.round(img).astype(np.int16)

out = nib.Nifti1Image(data, affine)
out.set_qform(affine, code=1)
out.set_sform(affine, code=1)
out.header.set_xyzt_units(xyz='mm')
out.header['descrip'] = b'Turnmark RESEARCH USE ONLY - not for diagnosis or treatment'
nib.save(out, os.path.join(HERE, 'demo.nii.gz'))
