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


def face_distance_same_grid(region, spacing):
    """Margin to the border surface, one grid: for every voxel, the gap from its cell to the lesion's cells.

    The half-voxel rule applied explicitly: on a grid of half the spacing, sample 2i+1 is voxel i's
    centre and samples 2i and 2i+2 its faces, so a voxel's cell is the 3x3x3 samples around its centre.
    Between two boxes the nearest points have face or shared coordinates, all samples of that grid, so
    scipy's distance_transform_edt there (sampling = spacing / 2) gives the gap between cells exactly.
    """
    fine = np.zeros(tuple(2 * n + 1 for n in region.shape), dtype=bool)
    fine[1::2, 1::2, 1::2] = region
    fine = ndimage.binary_dilation(fine, structure=np.ones((3, 3, 3), dtype=bool))
    dt = ndimage.distance_transform_edt(~fine, sampling=np.asarray(spacing) / 2)
    return ndimage.minimum_filter(dt, size=3, mode='constant', cval=np.inf)[1::2, 1::2, 1::2]


def face_distance_two_grids(affine, idx, seg_affine, other_idx, seg):
    """Margin to the border surface across two grids: boxes in the lesion grid's frame (its unit axes).

    Each lesion voxel is a box of half its spacing per axis; each map voxel is the bounding box of its
    cell along those axes. The gap between two boxes: per axis, the centre offset less both half-widths,
    floored at 0. Candidates come from a k-d tree of centres (the gap is never under the centre distance
    less the summed half-widths' length); every candidate pair is then measured.
    """
    cols = affine[:3, :3]
    frame = (cols / np.linalg.norm(cols, axis=0)).T  # rows: the lesion grid's unit axes
    half = 0.5 * np.abs(frame @ cols).sum(axis=1) + 0.5 * np.abs(frame @ seg_affine[:3, :3]).sum(axis=1)
    a = world(affine, idx) @ frame.T
    b = world(seg_affine, other_idx) @ frame.T
    tree = cKDTree(a)
    d, which = tree.query(b)
    gap = lambda p, q: np.linalg.norm(np.maximum(np.abs(p - q) - half, 0), axis=-1)
    upper = gap(b, a[which]).min()
    reach = upper + np.linalg.norm(half) + 1e-9
    best, labels = np.inf, set()
    for t in np.nonzero(d <= reach)[0]:
        near = tree.query_ball_point(b[t], reach)
        g = gap(b[t], a[near]).min()
        lab = int(seg[tuple(other_idx[t])])
        if g < best - 1e-9:
            best, labels = g, {lab}
        elif g <= best + 1e-9:
            labels.add(lab)
    return float(best), sorted(labels)


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
                cell_dt = face_distance_same_grid(region, spacing)
                margin = float(cell_dt[other].min())
                nearest = np.unique(seg[other & (cell_dt <= margin + 1e-9)])
            elif other.any():
                margin, nearest = face_distance_two_grids(affine, idx, seg_affine, np.argwhere(other), seg)
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
