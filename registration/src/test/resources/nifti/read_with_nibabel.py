#!/usr/bin/python3
"""Prints what nibabel reads from a NIfTI-1 file, as one JSON object on stdout.

Used by NiftiNibabelRoundTripTest: files written by Turnmark must read back in nibabel with the
same affine and values. Data are flattened with i fastest (Fortran order), like Turnmark's arrays.
"""
import json
import sys

import numpy as np
import nibabel as nib

img = nib.load(sys.argv[1])
h = img.header
data = np.asanyarray(img.dataobj, dtype=np.float64)
out = {
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
json.dump(out, sys.stdout)
