#!/usr/bin/python3
"""Writes a CT-like noisy 512×512×300 series (300 files, Explicit VR Little Endian, int16, 0.7×0.7×1 mm)
with pydicom for bench/dicom-read.ts: air around an elliptic body, soft tissue, a brighter liver, a
spine and noise, so the data compresses about 2:1 like real CT.

Usage: dicom_series_bench.py OUTDIR
"""
import os
import random
import sys

import numpy as np
from pydicom.dataset import Dataset, FileMetaDataset
from pydicom.uid import CTImageStorage, ExplicitVRLittleEndian, generate_uid

out = sys.argv[1]
os.makedirs(out, exist_ok=True)
NX = NY = 512
NZ = 300
rng = np.random.default_rng(11)
j, i = np.mgrid[0:NY, 0:NX]
body = ((i - 256) / 220) ** 2 + ((j - 256) / 160) ** 2 < 1
spine = ((i - 256) / 25) ** 2 + ((j - 370) / 25) ** 2 < 1
study, series = generate_uid(), generate_uid()
names = list(range(NZ))
random.Random(1).shuffle(names)
for k in range(NZ):
    lz = (k - 150) / 110
    liver = ((i - 180) / 90) ** 2 + ((j - 230) / 70) ** 2 + lz * lz < 1
    v = np.full((NY, NX), -1000, dtype=np.int32)
    v[body] = 40
    v[liver] = 60
    v[spine] = 700
    noise = rng.integers(-20, 21, size=(NY, NX))
    v = v + np.where(v > -1000, noise, noise >> 2) + 1024
    ds = Dataset()
    ds.SOPClassUID = CTImageStorage
    ds.SOPInstanceUID = generate_uid()
    ds.StudyInstanceUID, ds.SeriesInstanceUID = study, series
    ds.SeriesNumber, ds.Modality, ds.StudyDate = 3, 'CT', '20260101'
    ds.ImagePositionPatient = [-179.0, -179.0, -150.0 + k]
    ds.ImageOrientationPatient = [1.0, 0.0, 0.0, 0.0, 1.0, 0.0]
    ds.PixelSpacing = [0.7, 0.7]
    ds.SliceThickness = 1.0
    ds.SamplesPerPixel, ds.PhotometricInterpretation = 1, 'MONOCHROME2'
    ds.Rows, ds.Columns = NY, NX
    ds.BitsAllocated, ds.BitsStored, ds.HighBit, ds.PixelRepresentation = 16, 16, 15, 1
    ds.RescaleIntercept, ds.RescaleSlope = -1024, 1
    ds.PixelData = v.astype('<i2').tobytes()
    meta = FileMetaDataset()
    meta.MediaStorageSOPClassUID, meta.MediaStorageSOPInstanceUID = ds.SOPClassUID, ds.SOPInstanceUID
    meta.TransferSyntaxUID = ExplicitVRLittleEndian
    ds.file_meta = meta
    ds.is_little_endian, ds.is_implicit_VR = True, False
    ds.save_as(os.path.join(out, f'IM{names[k]:05d}'), write_like_original=False)
