#!/usr/bin/python3
"""Writes a NIfTI scan (read with nibabel) as a CT DICOM series with pydicom, keeping its world
geometry (PS3.3 C.7.6.2.1.1; LPS = RAS with x and y negated) and values (stored + 1024, intercept
-1024), under shuffled names, beside a localizer.

Usage: nifti_to_dicom.py NIFTI OUTDIR [SYNTAX]
SYNTAX of the series' slices as in dicom_series.py (explicit by default; jpegls and j2k through gdcmconv).
"""
import os
import random
import sys

import nibabel as nib
import numpy as np
from pydicom.uid import ExplicitVRLittleEndian, generate_uid

from dicom_series import SYNTAXES, base, put_pixels, save


def main():
    img = nib.load(sys.argv[1])
    out = sys.argv[2]
    syntax = SYNTAXES[sys.argv[3] if len(sys.argv) > 3 else 'explicit']
    os.makedirs(out, exist_ok=True)
    vol = np.rint(np.asarray(img.dataobj, dtype=float) * 1 + 0).astype(np.int32)
    lps = np.diag([-1, -1, 1, 1]) @ img.affine
    spacing = np.linalg.norm(lps[:3, :3], axis=0)
    row_cos, col_cos = lps[:3, 0] / spacing[0], lps[:3, 1] / spacing[1]
    study, series = generate_uid(), generate_uid()
    nz = vol.shape[2]
    names = [f'{random.Random(k).getrandbits(40):010x}' for k in range(nz + 1)]
    for k in range(nz):
        ds = base(series, study, 4, 'Abdomen portal venous')
        ds.PatientID = 'DCM-0007'
        ds.PatientName = 'Example^Dicom'
        ds.StudyDate = '20260520'
        ds.SliceThickness = str(round(float(spacing[2]), 4))
        ds.ImagePositionPatient = [float(x) for x in (lps @ np.array([0, 0, k, 1.0]))[:3]]
        ds.ImageOrientationPatient = [float(x) for x in [*row_cos, *col_cos]]
        ds.PixelSpacing = [float(spacing[1]), float(spacing[0])]
        put_pixels(ds, (vol[:, :, k].T + 1024).astype(np.uint16), ExplicitVRLittleEndian)
        save(ds, os.path.join(out, names[k]), syntax)
    loc = base(generate_uid(), study, 1, 'Scout')
    loc.PatientID, loc.PatientName, loc.StudyDate = 'DCM-0007', 'Example^Dicom', '20260520'
    loc.ImageType = ['ORIGINAL', 'PRIMARY', 'LOCALIZER']
    loc.ImagePositionPatient = [0.0, -150.0, 100.0]
    loc.ImageOrientationPatient = [0.0, 1.0, 0.0, 0.0, 0.0, -1.0]
    loc.PixelSpacing = [1.0, 1.0]
    put_pixels(loc, np.zeros((40, 30), dtype=np.uint16), ExplicitVRLittleEndian)
    save(loc, os.path.join(out, names[-1]), ExplicitVRLittleEndian)


main()
