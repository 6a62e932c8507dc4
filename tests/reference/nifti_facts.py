"""Reference facts for NIfTI files, as nibabel reads them.

Usage: /usr/bin/python3 nifti_facts.py FILE [FILE ...]
Prints one JSON list, one object per file: format, dims, datatype, nibabel's best affine, sform,
qform, codes, pixdim, scaling, and facts of the first 3-D volume's scaled values (count, sum, a
position-weighted sum, min, max, samples at fixed voxel indices). Values come from nibabel's own
reading; a header without its data file reports values as null.
"""
import json
import sys

import nibabel as nib
import numpy as np


def load(path):
    img = nib.load(path)
    # A CIFTI-2 file is NIfTI-2 underneath; read it as plain NIfTI-2 to see its header and array.
    if img.__class__.__name__.startswith('Cifti2'):
        img = nib.Nifti2Image.from_filename(path)
    return img


def floats(a):
    return [[float(x) for x in row] for row in np.asarray(a)]


def facts(path):
    img = load(path)
    hdr = img.header
    out = {
        'file': path,
        'class': type(img).__name__,
        'format': 'NIfTI-2' if isinstance(hdr, nib.Nifti2Header) else 'NIfTI-1',
        'dims': [int(d) for d in img.shape],
        'dtype': np.dtype(hdr.get_data_dtype()).name,
        'datatypeCode': int(hdr['datatype']),
        'endianness': hdr.endianness,
        'bestAffine': floats(hdr.get_best_affine()),
        # Analyze 7.5 headers have neither transform.
        'sform': floats(hdr.get_sform()) if hasattr(hdr, 'get_sform') else None,
        'qform': floats(hdr.get_qform()) if hasattr(hdr, 'get_qform') else None,
        'sformCode': int(hdr['sform_code']) if 'sform_code' in hdr else 0,
        'qformCode': int(hdr['qform_code']) if 'qform_code' in hdr else 0,
        'pixdim': [float(p) for p in hdr['pixdim']],
        # nibabel moves the file's scl_slope/scl_inter from the header into the array proxy on load.
        'slopeInter': [float(getattr(img.dataobj, 'slope', 1.0)), float(getattr(img.dataobj, 'inter', 0.0))],
        'values': None,
    }
    try:
        arr = np.asarray(img.dataobj, dtype=np.float64)
    except Exception as e:  # header without its image file, or a datatype nibabel cannot scale
        out['valuesError'] = str(e)
        return out
    nvox = int(np.prod(img.shape[:3]))
    first = arr.reshape(-1, order='F')[:nvox]
    weights = (np.arange(nvox) % 101) + 1
    picks = sorted({0, nvox - 1, nvox // 2, (nvox * 7) // 13, (nvox * 3) // 5})
    # Resampled images hold NaN outside the field of view: count them and sum the rest.
    out['values'] = {
        'count': nvox,
        'nanCount': int(np.isnan(first).sum()),
        'sum': float(np.nansum(first)),
        'wsum': float(np.nansum(first * weights)),
        'min': float(np.nanmin(first)),
        'max': float(np.nanmax(first)),
        'samples': [[int(n), None if np.isnan(first[n]) else float(first[n])] for n in picks],
    }
    return out


if __name__ == '__main__':
    print(json.dumps([facts(p) for p in sys.argv[1:]]))
