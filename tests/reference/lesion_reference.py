#!/usr/bin/python3
"""Reference values for lesion measures, from scipy.ndimage, scipy.spatial and scikit-image.

Usage: lesion_reference.py JOB.json  -> prints one JSON document.

JOB: {"cases": [case, ...]}; each case names raw little-endian arrays in NIfTI order (i fastest):
  {"name", "dims", "affine" (16, row-major voxel->world RAS mm), "mask", "maskDtype",
   "scan", "scanDtype", "scanSlope", "scanInter",
   "segments", "segmentsDtype", "segmentsDims", "segmentsAffine",   (label 0 = background)
   "labelsOut" (path: scipy's label array is written there as int32, NIfTI order)}
Lesions are the 26-connected components of mask != 0 (scipy.ndimage.label, 3x3x3 structure), or
with "multiLabel" one lesion per mask value.
"""
import json
import sys

import numpy as np
from scipy import ndimage
from scipy.spatial import ConvexHull, cKDTree
from scipy.spatial.distance import pdist, squareform
from skimage.measure import regionprops


def load(path, dtype, dims):
    return np.fromfile(path, dtype=np.dtype(dtype).newbyteorder('<')).reshape(dims, order='F')


def world(affine, ijk):
    ijk = np.asarray(ijk, dtype=float)
    return ijk @ affine[:3, :3].T + affine[:3, 3]


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
    """Brute force over all voxel pairs of each axial slice: longest distance, and the perpendicular
    widths for every pair that attains it (ties make the short axis ambiguous)."""
    ax = axial_axis(affine)
    in_plane = [c for c in range(3) if c != ax]
    normal = np.cross(affine[:3, in_plane[0]], affine[:3, in_plane[1]])
    normal /= np.linalg.norm(normal)
    best, widths = -1.0, []
    for s in np.unique(idx[:, ax]):
        pts = world(affine, idx[idx[:, ax] == s])
        if len(pts) == 1:
            d = np.zeros((1, 1))
        else:
            d = squareform(pdist(pts))
        m = d.max()
        if m > best * (1 + 1e-9) + 1e-9:
            best, widths = m, []
        if abs(m - best) <= 1e-9 * max(1.0, best):
            for a, b in zip(*np.nonzero(np.abs(d - m) <= 1e-9 * max(1.0, m))):
                if a >= b and len(pts) > 1:
                    continue
                if len(pts) == 1:
                    widths.append(0.0)
                    continue
                direction = pts[b] - pts[a]
                perp = np.cross(normal, direction)
                perp /= np.linalg.norm(perp)
                proj = pts @ perp
                widths.append(float(proj.max() - proj.min()))
    return float(best), sorted(set(round(w, 9) for w in widths))


def max_3d(affine, idx):
    pts = world(affine, idx)
    if len(pts) < 2:
        return 0.0
    try:
        pts = pts[ConvexHull(pts).vertices]
    except Exception:  # flat or tiny sets: every pair
        pass
    return float(pdist(pts).max())


def feret_per_slice(mask_lesion, affine):
    """scikit-image's feret_diameter_max per axial slice, in pixels (contour based: within a pixel)."""
    ax = axial_axis(affine)
    best = 0.0
    for s in range(mask_lesion.shape[ax]):
        sl = np.take(mask_lesion, s, axis=ax).astype(np.uint8)
        if sl.any():
            best = max(best, regionprops(sl)[0].feret_diameter_max)
    return best


def run_case(c):
    dims = tuple(c['dims'])
    affine = np.array(c['affine'], dtype=float).reshape(4, 4)
    mask = load(c['mask'], c['maskDtype'], dims)
    scan = load(c['scan'], c['scanDtype'], dims) * c.get('scanSlope', 1.0) + c.get('scanInter', 0.0)
    seg_dims = tuple(c.get('segmentsDims', dims))
    seg_affine = np.array(c.get('segmentsAffine', c['affine']), dtype=float).reshape(4, 4)
    seg = load(c['segments'], c['segmentsDtype'], seg_dims)
    same_grid = seg_dims == dims and np.allclose(seg_affine, affine)
    spacing = np.linalg.norm(affine[:3, :3], axis=0)

    if c.get('multiLabel'):
        # One lesion per label value, connected or not.
        labels = mask.astype(np.int64)
        index = [int(v) for v in np.unique(labels) if v != 0]
        count = len(index)
    else:
        labels, count = ndimage.label(mask != 0, structure=np.ones((3, 3, 3)))
        index = list(range(1, count + 1))
    if 'labelsOut' in c:
        labels.astype('<i4').ravel(order='F').tofile(c['labelsOut'])
    com = ndimage.center_of_mass(mask != 0, labels, index)
    means = ndimage.mean(scan, labels, index)
    props = {p.label: p for p in regionprops(labels)}
    seg_inv = np.linalg.inv(seg_affine)
    lesions = []
    for pos, n in enumerate(index):
        region = labels == n
        idx = np.argwhere(region)
        centroid = world(affine, com[pos])
        # Own segment: the map voxel holding the centroid.
        cv = np.rint(world(seg_inv, centroid)).astype(int)
        inside = np.all(cv >= 0) and np.all(cv < np.array(seg_dims))
        own = int(seg[tuple(cv)]) if inside else 0
        fallback_mm = None
        if own == 0:
            # Background: the nearest segment voxel centre within 5 mm (brief), brute force.
            labelled = np.argwhere(seg != 0)
            d = np.linalg.norm(world(seg_affine, labelled) - centroid, axis=1)
            if len(d) and d.min() <= 5:
                own = int(seg[tuple(labelled[np.argmin(d)])])
                fallback_mm = float(d.min())
        # Segment of every lesion voxel through world coordinates.
        if same_grid:
            vox_seg = seg[region]
        else:
            mv = np.rint(world(seg_inv, world(affine, idx))).astype(int)
            ok = np.all((mv >= 0) & (mv < np.array(seg_dims)), axis=1)
            vox_seg = np.zeros(len(idx), dtype=int)
            vox_seg[ok] = seg[tuple(mv[ok].T)]
        counts = np.bincount(vox_seg.astype(int), minlength=16)
        fractions = {str(v): counts[v] / len(idx) for v in range(1, 16) if counts[v] > 0}
        spans = own != 0 and any(v not in (0, own) for v in np.unique(vox_seg))
        margin, nearest = None, []
        if own != 0 and not spans:
            other = (seg != 0) & (seg != own)
            if same_grid and other.any():
                # Distance from every voxel centre to the lesion, anisotropic sampling.
                dt = ndimage.distance_transform_edt(~region, sampling=spacing)
                margin = float(dt[other].min())
                nearest = np.unique(seg[other & (dt <= margin + 1e-9)])
            elif other.any():
                # Exact nearest pair between lesion voxel centres and other-segment voxel centres.
                other_idx = np.argwhere(other)
                d, which = cKDTree(world(seg_affine, other_idx)).query(world(affine, idx))
                margin = float(d.min())
                nearest = np.unique(seg[tuple(other_idx[which[d <= margin + 1e-9]].T)])
        longest, widths = longest_axial(affine, idx)
        p = props[n]
        lesions.append({
            'voxels': int(len(idx)),
            'firstVoxel': int(np.ravel_multi_index(tuple(idx[np.lexsort(idx.T)][0]), dims, order='F')),
            'centroidMm': centroid.tolist(),
            'skimageArea': int(p.area),
            'skimageCentroidMm': world(affine, p.centroid).tolist(),
            'label': n,
            'meanValue': float(means[pos]),
            'ownLabel': own,
            'fallbackMm': fallback_mm,
            'fractions': fractions,
            'spans': bool(spans),
            'marginMm': margin,
            'nearestLabels': [int(v) for v in nearest],
            'longestAxialMm': longest,
            'shortAxisOptionsMm': widths,
            'max3dMm': max_3d(affine, idx),
            'feretMaxPx': float(feret_per_slice(region, affine)),
        })
    return {'name': c['name'], 'count': int(count), 'lesions': lesions}


def main():
    with open(sys.argv[1]) as f:
        job = json.load(f)
    json.dump({'cases': [run_case(c) for c in job['cases']]}, sys.stdout)


if __name__ == '__main__':
    main()
