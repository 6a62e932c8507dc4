#!/usr/bin/python3
"""Reference margins to the border surface on one grid, two independent ways.

Usage: margin_reference.py JOB.json  -> prints one JSON document.

JOB: {"cases": [{"name", "dims", "spacing", "mask", "segments", "own"}]}: raw uint8 arrays in NIfTI
order (i fastest); the lesion is mask != 0, in segment `own`; other segments are labels not 0 or own.
Answer per case:
  "edtMm": scipy.ndimage.distance_transform_edt with sampling on a grid of half the spacing, where
           voxel faces are samples (lesion_reference.face_distance_same_grid);
  "pairsMm": every lesion voxel against every other-segment voxel, the half-voxel rule written out:
           along each axis the centre offset less half a voxel at the lesion's face and half a voxel at
           the other segment's face, floored at 0.
"""
import json
import os
import sys

import numpy as np
from scipy import ndimage

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lesion_reference import face_distance_same_grid  # noqa: E402


def load(path, dims):
    return np.fromfile(path, dtype=np.uint8).reshape(dims, order='F')


def main():
    with open(sys.argv[1]) as f:
        job = json.load(f)
    out = []
    for c in job['cases']:
        dims = tuple(c['dims'])
        spacing = np.asarray(c['spacing'], dtype=float)
        region = load(c['mask'], dims) != 0
        seg = load(c['segments'], dims)
        other = (seg != 0) & (seg != c['own'])
        edt = float(face_distance_same_grid(region, spacing)[other].min())
        # Only voxels with a face neighbour outside their set can hold the nearest faces of two sets.
        face_border = lambda m: m & ~ndimage.binary_erosion(m, border_value=1)
        a, b = np.argwhere(face_border(region)), np.argwhere(face_border(other))
        best = np.inf
        for start in range(0, len(b), 512):
            delta = np.abs(a[:, None, :] - b[None, start:start + 512, :]).astype(float)
            gap = (np.maximum(delta * spacing - spacing / 2 - spacing / 2, 0) ** 2).sum(axis=2)
            best = min(best, float(gap.min()))
        out.append({'name': c['name'], 'edtMm': edt, 'pairsMm': float(np.sqrt(best))})
    print(json.dumps({'cases': out}))


main()
