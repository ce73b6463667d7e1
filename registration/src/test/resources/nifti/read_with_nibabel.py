#!/usr/bin/python3
"""Prints what nibabel reads from NIfTI-1 files: one JSON object keyed by the file names given.

Used by NiftiNibabelRoundTripTest: files written by Turnmark must read back in nibabel with the
same affine and values. Data are flattened with i fastest (Fortran order), like Turnmark's arrays.
"""
import json
import sys

import numpy as np
import nibabel as nib


def describe(path):
    img = nib.load(path)
    h = img.header
    data = np.asanyarray(img.dataobj, dtype=np.float64)
    return {
        'shape': [int(s) for s in img.shape],
        'affine': img.affine.tolist(),
        'qform': h.get_qform().tolist(),
        'sform': h.get_sform().tolist(),
        'qform_code': int(h['qform_code']),
        'sform_code': int(h['sform_code']),
        'qfac': float(h['pixdim'][0]),
        'datatype': str(img.get_data_dtype().newbyteorder('=')),
        'intent_code': int(h['intent_code']),
        'intent_name': h['intent_name'].item().decode('ascii'),
        'descrip': h['descrip'].item().decode('ascii'),
        'spatial_unit': h.get_xyzt_units()[0],
        'data': data.ravel(order='F').tolist(),
    }


json.dump({p: describe(p) for p in sys.argv[1:]}, sys.stdout)
