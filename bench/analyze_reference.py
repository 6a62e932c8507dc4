#!/usr/bin/python3
"""The analysis of one visit written with nibabel and scipy: the peer `bench/analyze-visit.ts` times
`falciform analyze` against. Same inputs, same definitions (segment volumes; lesions as 26-connected
components; centroid, volume, mean value, longest axial diameter and short axis, 3-D diameter,
segment of the centroid, fractions, margin by a box-limited distance transform). Prints one JSON
document shaped like `falciform analyze --json`.

Usage: analyze_reference.py --scan FILE --segments FILE --lesions FILE [--margin-mm N]
"""
import argparse
import json

import nibabel as nib
import numpy as np
from scipy import ndimage
from scipy.spatial import ConvexHull, QhullError
from scipy.spatial.distance import pdist, squareform

NAMES = {1: 'I', 2: 'II', 3: 'III', 4: 'IV', 5: 'V', 6: 'VI', 7: 'VII', 8: 'VIII'}


def hull_points(pts):
    try:
        return pts[ConvexHull(pts).vertices]
    except (QhullError, ValueError):  # flat or tiny: keep them all
        return pts


def axial_axis(affine):
    best, best_cos = 2, -1.0
    for axis in range(3):
        a, b = [affine[:3, c] for c in range(3) if c != axis]
        n = np.cross(a, b)
        cos = abs(n[2]) / np.linalg.norm(n)
        if cos > best_cos + 1e-12:
            best, best_cos = axis, cos
    return best


def longest_axial(affine, idx):
    ax = axial_axis(affine)
    a0, a1 = [c for c in range(3) if c != ax]
    u = affine[:3, a0] / np.linalg.norm(affine[:3, a0])
    v = affine[:3, a1] - (affine[:3, a1] @ u) * u
    v /= np.linalg.norm(v)
    best, short = -1.0, 0.0
    for s in np.unique(idx[:, ax]):
        pts = idx[idx[:, ax] == s] @ affine[:3, :3].T
        p2 = np.stack([pts @ u, pts @ v], axis=1)
        h = hull_points(p2)
        if len(h) < 2:
            d, i, j = 0.0, 0, 0
        else:
            dm = squareform(pdist(h))
            i, j = np.unravel_index(np.argmax(dm), dm.shape)
            d = dm[i, j]
        if d > best:
            best = d
            if d > 0:
                direction = (h[j] - h[i]) / d
                proj = h @ np.array([-direction[1], direction[0]])
                short = float(proj.max() - proj.min())
            else:
                short = 0.0
    return float(best), short


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument('--scan', required=True)
    ap.add_argument('--segments', required=True)
    ap.add_argument('--lesions', required=True)
    ap.add_argument('--margin-mm', type=float, default=10.0)
    a = ap.parse_args()
    cap = 3 * max(a.margin_mm, 10.0)

    scan_img, seg_img, les_img = (nib.load(f) for f in (a.scan, a.segments, a.lesions))
    scan = np.asanyarray(scan_img.dataobj)
    seg = np.asanyarray(seg_img.dataobj)
    mask = np.asanyarray(les_img.dataobj)
    affine = les_img.affine
    assert np.allclose(seg_img.affine, affine) and seg.shape == mask.shape, 'this peer handles one grid'
    spacing = np.linalg.norm(affine[:3, :3], axis=0)
    voxel_ml = abs(np.linalg.det(affine[:3, :3])) / 1000

    counts = np.bincount(seg.ravel(), minlength=16)
    segments = [{'segment': NAMES[v], 'volumeMl': counts[v] * voxel_ml} for v in NAMES if counts[v] > 0]

    labels, count = ndimage.label(mask != 0, structure=np.ones((3, 3, 3)))
    boxes = ndimage.find_objects(labels)
    inv = np.linalg.inv(affine)
    lesions = []
    for n in range(1, count + 1):
        box = boxes[n - 1]
        region = labels[box] == n
        origin = np.array([s.start for s in box])
        idx = np.argwhere(region) + origin
        centroid = affine[:3, :3] @ idx.mean(axis=0) + affine[:3, 3]
        c = np.rint(inv[:3, :3] @ centroid + inv[:3, 3]).astype(int)
        own = int(seg[tuple(c)]) if np.all(c >= 0) and np.all(c < seg.shape) else 0
        if own == 0:  # nearest segment voxel within 5 mm
            g = np.ceil(5 / spacing).astype(int)
            lo, hi = np.maximum(c - g, 0), np.minimum(c + g + 1, seg.shape)
            sub = seg[lo[0]:hi[0], lo[1]:hi[1], lo[2]:hi[2]]
            cand = np.argwhere(sub != 0)
            if len(cand):
                d = np.linalg.norm((cand + lo) @ affine[:3, :3].T + affine[:3, 3] - centroid, axis=1)
                if d.min() <= 5:
                    own = int(sub[tuple(cand[np.argmin(d)])])
        in_seg = seg[box][region]
        seg_counts = np.bincount(in_seg, minlength=16)
        fractions = {NAMES[v]: seg_counts[v] / len(idx) for v in NAMES if seg_counts[v] > 0}
        others = [v for v in NAMES if seg_counts[v] > 0 and v != own]
        margin = None
        nearest = None
        if own != 0 and others:
            margin, nearest = 0.0, NAMES[max(others, key=lambda v: seg_counts[v])]
        elif own != 0:
            # Margin to the border surface, face to face: along each axis the centre offset less half a
            # voxel at each end (floored at 0), which is the centre distance from the lesion grown by
            # its 26 neighbours. One voxel more of box reaches every face within the cap.
            g = np.ceil(cap / spacing).astype(int) + 1
            lo = np.maximum(origin - g, 0)
            hi = np.minimum(np.array([s.stop for s in box]) + g, labels.shape)
            big = tuple(slice(l, h) for l, h in zip(lo, hi))
            grown = ndimage.binary_dilation(labels[big] == n, structure=np.ones((3, 3, 3), dtype=bool))
            dt = ndimage.distance_transform_edt(~grown, sampling=spacing)
            s = seg[big]
            other = (s != 0) & (s != own)
            if other.any():
                d = dt[other]
                k = np.argmin(d)
                if d[k] <= cap:
                    margin, nearest = float(d[k]), NAMES[int(s[other][k])]
        longest, short = longest_axial(affine, idx)
        world = idx @ affine[:3, :3].T
        max3d = float(pdist(hull_points(world)).max()) if len(idx) > 1 else 0.0
        lesions.append({
            'id': f'L{n}', 'centroidMm': centroid.tolist(), 'segment': NAMES.get(own),
            'segmentFractions': fractions, 'volumeMl': len(idx) * voxel_ml,
            'longestAxialMm': longest, 'shortAxisMm': short, 'marginMm': margin,
            'nearestOtherSegment': nearest, 'marginAlert': margin is not None and margin <= a.margin_mm,
            'max3dMm': max3d,
            'meanValue': float(scan[box][region].mean()),
        })
    liver = float(sum(counts[v] for v in NAMES) * voxel_ml)
    print(json.dumps({'segments': segments, 'liverVolumeMl': liver, 'lesions': lesions, 'warnings': []}))


if __name__ == '__main__':
    main()
