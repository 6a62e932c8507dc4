#!/usr/bin/python3
"""Writes a CT series with pydicom from a volume with a known oblique, anisotropic affine, so Falciform's
DICOM reader is checked against files it did not write.

Usage: dicom_series.py OUTDIR CASE [SYNTAX]
CASE: good | missing | two-orientations | duplicate | junk | tilt | enhanced | rescale
SYNTAX: explicit (default) | implicit | bigendian | deflated | rle | jpegls | j2k
(jpegls and j2k: written explicit, then compressed losslessly by GDCM's gdcmconv, Debian's libgdcm-tools:
JPEG-LS Lossless 1.2.840.10008.1.2.4.80 and JPEG 2000 Lossless Only 1.2.840.10008.1.2.4.90.)
Writes OUTDIR/dicom/ (slices under shuffled random names, beside a localizer and, for `junk`, a text
file), OUTDIR/original.nii.gz (the volume and its RAS affine, via nibabel) and prints a JSON summary.
Geometry per DICOM PS3.3 C.7.6.2.1.1 (LPS patient coordinates; RAS = LPS with x and y negated).
"""
import json
import os
import random
import subprocess
import sys

import nibabel as nib
import numpy as np
import pydicom
from pydicom.dataset import Dataset, FileMetaDataset
from pydicom.sequence import Sequence
from pydicom.uid import (CTImageStorage, DeflatedExplicitVRLittleEndian, ExplicitVRBigEndian,
                         ExplicitVRLittleEndian, ImplicitVRLittleEndian, RLELossless, generate_uid)

NX, NY, NZ = 32, 28, 20
SPACING = (0.7, 0.9, 2.5)
SYNTAXES = {'explicit': ExplicitVRLittleEndian, 'implicit': ImplicitVRLittleEndian, 'bigendian': ExplicitVRBigEndian,
            'deflated': DeflatedExplicitVRLittleEndian, 'rle': RLELossless,
            'jpegls': '1.2.840.10008.1.2.4.80', 'j2k': '1.2.840.10008.1.2.4.90'}
GDCMCONV = {'1.2.840.10008.1.2.4.80': '--jpegls', '1.2.840.10008.1.2.4.90': '--j2k'}
ENHANCED_CT = '1.2.840.10008.5.1.4.1.1.2.1'


def rotation(axis, deg):
    a = np.radians(deg)
    axis = np.asarray(axis, float) / np.linalg.norm(axis)
    k = np.array([[0, -axis[2], axis[1]], [axis[2], 0, -axis[0]], [-axis[1], axis[0], 0]])
    return np.eye(3) + np.sin(a) * k + (1 - np.cos(a)) * k @ k


def ras_affine():
    r = rotation([0.3, -0.5, 1.0], 23.0) @ rotation([1.0, 0.2, 0.0], 11.0)
    a = np.eye(4)
    a[:3, :3] = r @ np.diag(SPACING)
    a[:3, 3] = [-31.5, 17.25, -102.0]
    return a


def base(series_uid, study_uid, number, description, sop_class=CTImageStorage):
    ds = Dataset()
    ds.SOPClassUID = sop_class
    ds.SOPInstanceUID = generate_uid()
    ds.StudyInstanceUID = study_uid
    ds.SeriesInstanceUID = series_uid
    ds.SeriesNumber = number
    ds.SeriesDescription = description
    ds.Modality = 'CT'
    ds.StudyDate = '20260314'
    ds.PatientID = 'SYN-0042'
    ds.PatientName = 'Testcase^Synthetic'
    ds.PatientBirthDate = '19600101'
    ds.KVP = '120'
    ds.ContrastBolusAgent = 'IODINE'
    ds.Manufacturer = 'Synthetic'
    ds.ManufacturerModelName = 'Phantom 1'
    ds.SliceThickness = str(SPACING[2])
    ds.SamplesPerPixel = 1
    ds.PhotometricInterpretation = 'MONOCHROME2'
    ds.BitsAllocated = 16
    ds.BitsStored = 16
    ds.HighBit = 15
    ds.PixelRepresentation = 0
    ds.RescaleIntercept = '-1024'
    ds.RescaleSlope = '1'
    ds.ImageType = ['ORIGINAL', 'PRIMARY', 'AXIAL']
    return ds


def save(ds, path, syntax):
    if syntax in GDCMCONV:
        save(ds, path, ExplicitVRLittleEndian)
        subprocess.run(['gdcmconv', GDCMCONV[syntax], path, path], check=True)
        if pydicom.dcmread(path, stop_before_pixels=True).file_meta.TransferSyntaxUID != syntax:
            raise SystemExit(f'gdcmconv did not write {syntax}')
        return
    meta = FileMetaDataset()
    meta.MediaStorageSOPClassUID = ds.SOPClassUID
    meta.MediaStorageSOPInstanceUID = ds.SOPInstanceUID
    meta.TransferSyntaxUID = ExplicitVRLittleEndian if syntax == RLELossless else syntax
    meta.ImplementationClassUID = generate_uid()
    ds.file_meta = meta
    ds.is_little_endian = syntax != ExplicitVRBigEndian
    ds.is_implicit_VR = syntax == ImplicitVRLittleEndian
    if syntax == RLELossless:
        ds.compress(RLELossless)
    ds.save_as(path, write_like_original=False)


def put_pixels(ds, plane, syntax):
    # Native pixel data is written in the transfer syntax's byte order (PS3.5 A.2, A.3).
    ds.Rows, ds.Columns = plane.shape
    ds.PixelData = np.ascontiguousarray(plane.astype('>u2' if syntax == ExplicitVRBigEndian else '<u2')).tobytes()


def main():
    out, case = sys.argv[1], sys.argv[2]
    syntax = SYNTAXES[sys.argv[3] if len(sys.argv) > 3 else 'explicit']
    rng = np.random.default_rng(7)
    # CT-like stored values (HU + 1024), distinct enough that a misplaced voxel shows.
    vol = rng.integers(0, 3000, size=(NX, NY, NZ), dtype=np.uint16)
    affine = ras_affine()
    lps = np.diag([-1, -1, 1, 1]) @ affine
    row_cos = lps[:3, 0] / SPACING[0]
    col_cos = lps[:3, 1] / SPACING[1]
    folder = os.path.join(out, 'dicom')
    os.makedirs(folder, exist_ok=True)
    study = generate_uid()
    series = generate_uid()
    names = [f'{random.Random(k).getrandbits(40):010x}' for k in range(NZ + 8)]
    random.Random(3).shuffle(names)
    positions = [lps @ np.array([0, 0, k, 1.0]) for k in range(NZ)]
    if case == 'tilt':
        # Each slice shifted sideways along the column direction: a sheared (gantry-tilted) grid.
        positions = [p + np.append(col_cos * 0.4 * k, 0) for k, p in enumerate(positions)]
    ks = list(range(NZ))
    if case == 'missing':
        ks.remove(8)
    if case == 'enhanced':
        ds = base(series, study, 2, 'Portal venous', ENHANCED_CT)
        ds.NumberOfFrames = NZ
        order = list(range(NZ))
        random.Random(5).shuffle(order)
        shared = Dataset()
        pm = Dataset(); pm.PixelSpacing = [SPACING[1], SPACING[0]]; pm.SliceThickness = SPACING[2]
        po = Dataset(); po.ImageOrientationPatient = [*row_cos, *col_cos]
        pv = Dataset(); pv.RescaleIntercept = '-1024'; pv.RescaleSlope = '1'; pv.RescaleType = 'HU'
        shared.PixelMeasuresSequence = Sequence([pm])
        shared.PlaneOrientationSequence = Sequence([po])
        shared.PixelValueTransformationSequence = Sequence([pv])
        ds.SharedFunctionalGroupsSequence = Sequence([shared])
        frames = []
        for k in order:
            f = Dataset(); pp = Dataset(); pp.ImagePositionPatient = list(positions[k][:3])
            f.PlanePositionSequence = Sequence([pp])
            frames.append(f)
        ds.PerFrameFunctionalGroupsSequence = Sequence(frames)
        del ds.RescaleIntercept, ds.RescaleSlope, ds.SliceThickness
        ds.Rows, ds.Columns = NY, NX
        ds.PixelData = np.ascontiguousarray(np.stack([vol[:, :, k].T for k in order]).astype('>u2' if syntax == ExplicitVRBigEndian else '<u2')).tobytes()
        save(ds, os.path.join(folder, names[0]), syntax)
    else:
        for n, k in enumerate(ks):
            ds = base(series, study, 2, 'Portal venous')
            ds.InstanceNumber = NZ - k  # deliberately not the spatial order
            ds.ImagePositionPatient = [float(x) for x in positions[k][:3]]
            ds.ImageOrientationPatient = [float(x) for x in [*row_cos, *col_cos]]
            ds.PixelSpacing = [SPACING[1], SPACING[0]]
            if case == 'two-orientations' and k >= NZ - 3:
                ds.ImageOrientationPatient = [1.0, 0.0, 0.0, 0.0, 1.0, 0.0]
            if case == 'duplicate' and k == 5:
                ds.ImagePositionPatient = [float(x) for x in positions[4][:3]]
            plane = vol[:, :, k].T
            if case == 'rescale' and k % 2 == 1:
                # The same physical values under another intercept (PS3.3 C.11.1.1.2).
                ds.RescaleIntercept = '-1048'
                plane = plane + 24
            put_pixels(ds, plane, syntax)
            save(ds, os.path.join(folder, names[n]), syntax)
    # A localizer beside the series: one sagittal image of its own series.
    loc = base(generate_uid(), study, 1, 'Topogram 0.6 T20f')
    loc.ImageType = ['ORIGINAL', 'PRIMARY', 'LOCALIZER']
    loc.ImagePositionPatient = [0.0, -150.0, 100.0]
    loc.ImageOrientationPatient = [0.0, 1.0, 0.0, 0.0, 0.0, -1.0]
    loc.PixelSpacing = [1.0, 1.0]
    put_pixels(loc, rng.integers(0, 3000, size=(40, 30)), ExplicitVRLittleEndian)
    save(loc, os.path.join(folder, names[-1]), ExplicitVRLittleEndian)
    if case == 'junk':
        with open(os.path.join(folder, names[-2]), 'w') as f:
            f.write('export log: 20 images\n')
    img = nib.Nifti1Image(vol, affine)
    img.header.set_slope_inter(1.0, -1024.0)
    nib.save(img, os.path.join(out, 'original.nii.gz'))
    print(json.dumps({'folder': folder, 'original': os.path.join(out, 'original.nii.gz'), 'seriesUid': series,
                      'affine': affine.tolist(), 'dims': [NX, NY, NZ]}))


if __name__ == '__main__':
    main()
