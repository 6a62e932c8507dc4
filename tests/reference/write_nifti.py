#!/usr/bin/python3
"""Writes NIfTI-1 files with nibabel from raw arrays, so tests read files that our own writer did not make.

Usage: write_nifti.py JOB.json
JOB: {"files": [{"path": "x.nii.gz", "raw": "x.raw", "dtype": "uint8", "dims": [nx, ny, nz],
                 "affine": [16 numbers, row-major], "slope"?: 1, "inter"?: 0}]}
Raw arrays are little-endian in NIfTI order (i fastest). The affine goes to both sform and qform.
"""
import json
import sys

import nibabel as nib
import numpy as np


def main():
    with open(sys.argv[1]) as f:
        job = json.load(f)
    for spec in job['files']:
        data = np.fromfile(spec['raw'], dtype=np.dtype(spec['dtype']).newbyteorder('<')).reshape(spec['dims'], order='F')
        affine = np.array(spec['affine'], dtype=float).reshape(4, 4)
        img = nib.Nifti1Image(data, affine)
        img.header.set_data_dtype(data.dtype)
        img.set_sform(affine, code=1)
        img.set_qform(affine, code=1)
        if 'slope' in spec or 'inter' in spec:
            img.header.set_slope_inter(spec.get('slope', 1.0), spec.get('inter', 0.0))
        nib.save(img, spec['path'])
    print(json.dumps({'written': len(job['files'])}))


if __name__ == '__main__':
    main()
