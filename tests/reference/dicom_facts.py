#!/usr/bin/python3
"""Reference facts of DICOM files as pydicom (Debian's python3-pydicom) decodes them.

Usage: dicom_facts.py OUTDIR FILE [FILE ...]
Prints one JSON list, one object per file: whether pydicom decodes its pixels, the transfer syntax,
samples per pixel, frame count, the Image Plane module's values (PS3.3 C.7.6.2) and rescale. For a
decoded file, `pixel_array * RescaleSlope + RescaleIntercept` is written to OUTDIR as little-endian
float64 (frames, then rows, then columns) and its path given as `values`.
"""
import json
import os
import sys
import warnings

import numpy as np
import pydicom

warnings.simplefilter('ignore')


def floats(v):
    return None if v is None else [float(x) for x in v]


def facts(path, out, n):
    r = {'file': path, 'decoded': False}
    try:
        ds = pydicom.dcmread(path)
    except Exception as e:  # not readable as DICOM at all
        r['error'] = str(e)[:200]
        return r
    meta = getattr(ds, 'file_meta', None)
    r['syntax'] = str(meta.TransferSyntaxUID) if meta is not None and 'TransferSyntaxUID' in meta else None
    try:
        header(ds, r)
    except Exception as e:  # a header value pydicom cannot interpret
        r['error'] = str(e)[:200]
        return r
    try:
        a = ds.pixel_array
    except Exception as e:
        r['error'] = str(e)[:200]
        return r
    r['decoded'] = True
    r['shape'] = list(a.shape)
    values = os.path.join(out, f'{n}.f64')
    (a.astype('<f8') * r['slope'] + r['inter']).astype('<f8').tofile(values)
    r['values'] = values
    return r


def header(ds, r):
    r['samplesPerPixel'] = int(ds.get('SamplesPerPixel', 1))
    r['bitsAllocated'] = int(ds.get('BitsAllocated', 0))
    r['frames'] = int(ds.get('NumberOfFrames', 1) or 1)
    r['position'] = floats(ds.get('ImagePositionPatient'))
    r['orientation'] = floats(ds.get('ImageOrientationPatient'))
    r['pixelSpacing'] = floats(ds.get('PixelSpacing'))
    slope = float(ds.get('RescaleSlope', 1) or 1)
    inter = float(ds.get('RescaleIntercept', 0) or 0)
    r['slope'], r['inter'] = slope, inter


def main():
    out = sys.argv[1]
    print(json.dumps([facts(p, out, n) for n, p in enumerate(sys.argv[2:])]))


main()
