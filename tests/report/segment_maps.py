"""Reads exported segment maps back with nibabel and compares them with the maps Falciform used.

Usage: python3 segment_maps.py JOB.json, where JOB lists {"visit", "exported", "reference", "liver"?}.
Prints one JSON list: per visit the shapes, whether the label arrays are equal, the largest affine
difference (nibabel's best affine: sform, else qform), the label values, and, with a liver mask, whether
the labelled voxels are exactly the liver's.
"""
import json
import sys

import nibabel as nib
import numpy as np

out = []
for job in json.load(open(sys.argv[1])):
    exported = nib.load(job["exported"])
    reference = nib.load(job["reference"])
    e = np.asanyarray(exported.get_fdata(dtype=np.float64))
    r = np.asanyarray(reference.get_fdata(dtype=np.float64))
    row = {
        "visit": job["visit"],
        "shape": list(e.shape),
        "referenceShape": list(r.shape),
        "labelsEqual": bool(e.shape == r.shape and np.array_equal(e, r)),
        "maxAffineDiff": float(np.abs(exported.affine - reference.affine).max()),
        "labels": sorted(int(x) for x in np.unique(e)),
        "sformCode": int(exported.header["sform_code"]),
    }
    if job.get("liver"):
        liver = nib.load(job["liver"])
        m = np.asanyarray(liver.get_fdata(dtype=np.float64))
        row["liverMatches"] = bool(m.shape == e.shape and np.array_equal(m > 0, e > 0))
        row["liverAffineDiff"] = float(np.abs(exported.affine - liver.affine).max())
    out.append(row)
print(json.dumps(out))
