#!/usr/bin/python3
"""Reference masks for the voxel filters, from scipy.ndimage and scikit-image.

Usage: image_reference.py JOB.json  -> writes each result as raw uint8 (NIfTI order, i fastest) and
prints {"written": [...]}.

JOB: {"dims": [nx, ny, nz], "spacing": [sx, sy, sz], "mask": raw uint8 path, "image": raw float32
path, "ops": [op, ...]}; op is one of
  {"kind": "dilate"|"erode"|"open"|"close", "radiusMm": r, "out": path}
      scipy.ndimage.binary_dilation/erosion/opening/closing with a ball structuring element: the
      offsets d with sum((d*spacing)^2) <= r^2 (1 + 1e-6), border_value=0 (the default).
  {"kind": "fill", "out": path}                scipy.ndimage.binary_fill_holes (default structure)
  {"kind": "flood", "seed": [i, j, k], "tolerance": t, "connectivity": 1|3, "out": path}
      skimage.segmentation.flood on the image
"""
import json
import sys

import numpy as np
from scipy import ndimage
from skimage.segmentation import flood


def ball(spacing, r):
    half = [int(np.ceil(r / s - 1e-9)) for s in spacing]
    grids = np.meshgrid(*[np.arange(-h, h + 1) * s for h, s in zip(half, spacing)], indexing='ij')
    return sum(g * g for g in grids) <= r * r * (1 + 1e-6)


def main():
    job = json.load(open(sys.argv[1]))
    dims = tuple(job['dims'])
    spacing = job['spacing']
    mask = np.fromfile(job['mask'], dtype=np.uint8).reshape(dims, order='F').astype(bool)
    image = np.fromfile(job['image'], dtype='<f4').reshape(dims, order='F').astype(np.float64)
    written = []
    for op in job['ops']:
        kind = op['kind']
        if kind == 'fill':
            out = ndimage.binary_fill_holes(mask)
        elif kind == 'flood':
            out = flood(image, tuple(op['seed']), tolerance=op['tolerance'], connectivity=op['connectivity'])
        else:
            se = ball(spacing, op['radiusMm'])
            fn = {'dilate': ndimage.binary_dilation, 'erode': ndimage.binary_erosion,
                  'open': ndimage.binary_opening, 'close': ndimage.binary_closing}[kind]
            out = fn(mask, structure=se)
        out.astype(np.uint8).ravel(order='F').tofile(op['out'])
        written.append(op['out'])
    print(json.dumps({'written': written}))


main()
