#!/usr/bin/python3
"""The liver-from-a-seed steps of `falciform liver`, written with nibabel, numpy and scipy.ndimage, for
bench/grow-liver.ts. Same steps and defaults: Perona-Malik diffusion (3 steps, g = 1/(1+(d/k)^2),
k = twice the robust noise level in an 8 mm ball at the seed, neighbour weights (h_min/h)^2), window
median +- max(3 x spread, 15) of the smoothed 8 mm ball, the seed's 6-connected region, opening with
a 5 mm ball, the seed's component, given back inside the region by a 5 mm dilation, closing with a
4 mm ball, hole filling. Balls in mm come from scipy.ndimage.distance_transform_edt with sampling
(the fast way to apply a large ball in scipy), on the region's bounding box.

Usage: grow_liver_reference.py --scan FILE --seed X,Y,Z --out FILE   -> prints {"voxels", "volumeMl"}
"""
import argparse
import json

import nibabel as nib
import numpy as np
from scipy import ndimage

FACE = ndimage.generate_binary_structure(3, 1)


def ball_stats(values, ijk, spacing, r):
    half = [int(r // s) for s in spacing]
    sl = tuple(slice(max(0, c - h), c + h + 1) for c, h in zip(ijk, half))
    grids = np.meshgrid(*[(np.arange(s.start, min(s.stop, n)) - c) * sp for s, c, sp, n in zip(sl, ijk, spacing, values.shape)], indexing='ij')
    inside = sum(g * g for g in grids) <= r * r
    v = values[sl][inside].astype(np.float64)
    med = np.median(v)
    return med, 1.4826 * np.median(np.abs(v - med))


def diffuse(u, spacing, steps, k):
    h2 = min(spacing) ** 2
    w = [h2 / s ** 2 for s in spacing]
    dt = 1 / (2 * sum(w))
    inv2 = np.float32(1 / (k * k))
    for _ in range(steps):
        total = np.zeros_like(u)
        for axis in range(3):
            d = np.diff(u, axis=axis)
            flux = np.float32(w[axis]) * d / (1 + d * d * inv2)
            lo = [slice(None)] * 3
            hi = [slice(None)] * 3
            lo[axis] = slice(0, -1)
            hi[axis] = slice(1, None)
            total[tuple(lo)] += flux
            total[tuple(hi)] -= flux
        u += np.float32(dt) * total
    return u


def component(mask, seed):
    labels, _ = ndimage.label(mask, structure=FACE)
    lab = labels[seed]
    return labels == lab if lab else np.zeros_like(mask)


def dilate(mask, spacing, r):
    return ndimage.distance_transform_edt(~mask, sampling=spacing) <= r * (1 + 5e-7)


def erode(mask, spacing, r):
    padded = np.pad(mask, 1)
    return ndimage.distance_transform_edt(padded, sampling=spacing)[1:-1, 1:-1, 1:-1] > r * (1 + 5e-7)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument('--scan')
    ap.add_argument('--seed')
    ap.add_argument('--out')
    a = ap.parse_args()
    img = nib.load(a.scan)
    spacing = [float(s) for s in img.header.get_zooms()[:3]]
    values = np.asarray(img.dataobj, dtype=np.float32)
    seed_mm = np.array([float(x) for x in a.seed.split(',')] + [1.0])
    ijk = tuple(int(round(c)) for c in (np.linalg.inv(img.affine) @ seed_mm)[:3])
    _, noise = ball_stats(values, ijk, spacing, 8)
    values = diffuse(values, spacing, 3, max(1.0, 2 * noise))
    med, spread = ball_stats(values, ijk, spacing, 8)
    half = max(3 * spread, 15)
    region = component((values >= med - half) & (values <= med + half), ijk)
    del values
    # Work on the region's box grown by the largest radius, as the morphology only acts there.
    pad = [int(np.ceil(6 / s)) for s in spacing]
    nz = np.nonzero(region)
    box = tuple(slice(max(0, int(x.min()) - p), int(x.max()) + p + 1) for x, p in zip(nz, pad))
    r = region[box]
    seed = tuple(c - s.start for c, s in zip(ijk, box))
    opened = dilate(erode(r, spacing, 5), spacing, 5)
    kept = component(opened, seed)
    liver = dilate(kept, spacing, 5) & r
    liver = erode(dilate(liver, spacing, 4), spacing, 4)
    liver = ndimage.binary_fill_holes(liver)
    out = np.zeros(region.shape, dtype=np.uint8)
    out[box] = liver
    nib.save(nib.Nifti1Image(out, img.affine), a.out)
    count = int(out.sum())
    print(json.dumps({'voxels': count, 'volumeMl': count * float(np.prod(spacing)) / 1000}))


main()
