"""Writes NIfTI test files with nibabel into OUTDIR and prints a JSON manifest of what each is.

Usage: /usr/bin/python3 nifti_make.py OUTDIR
Covers: an oblique, sheared sform (with a different qform, to show the sform wins), qform only with
qfac +1 and -1, pixdim only, every supported datatype in both byte orders, explicit scl_slope and
scl_inter, 4-D, NIfTI-2 big-endian, .hdr/.img pairs, and datatypes Falciform refuses.
"""
import gzip
import json
import os
import sys

import nibabel as nib
import numpy as np

out_dir = sys.argv[1]
rng = np.random.default_rng(20260112)
manifest = []


def rot(ax, ay, az):
    cx, sx, cy, sy, cz, sz = np.cos(ax), np.sin(ax), np.cos(ay), np.sin(ay), np.cos(az), np.sin(az)
    rx = np.array([[1, 0, 0], [0, cx, -sx], [0, sx, cx]])
    ry = np.array([[cy, 0, sy], [0, 1, 0], [-sy, 0, cy]])
    rz = np.array([[cz, -sz, 0], [sz, cz, 0], [0, 0, 1]])
    return rz @ ry @ rx


def affine(r, zooms, shift):
    a = np.eye(4)
    a[:3, :3] = r @ np.diag(zooms)
    a[:3, 3] = shift
    return a


def add(name, kind, **extra):
    manifest.append({'file': os.path.join(out_dir, name), 'kind': kind, **extra})


def data(shape, dtype):
    dt = np.dtype(dtype)
    if dt.kind == 'f':
        return (rng.standard_normal(shape) * 100).astype(dt)
    info = np.iinfo(dt)
    lo, hi = max(info.min, -30000), min(info.max, 60000)
    return rng.integers(lo, hi, size=shape, endpoint=True).astype(dt)


shape = (7, 6, 5)

# Oblique and sheared sform; a different qform that must be ignored because sform_code > 0.
oblique = affine(rot(0.3, -0.2, 0.5), (0.7, 0.8, 2.5), (-120.5, 40.25, 11.0))
oblique[0, 1] += 0.15  # shear: representable only by the sform
img = nib.Nifti1Image(data(shape, np.int16), oblique)
img.set_qform(affine(rot(0.1, 0, 0), (1, 1, 1), (5, 6, 7)), code=1)
img.set_sform(oblique, code=1)
nib.save(img, os.path.join(out_dir, 'oblique_sform.nii.gz'))
add('oblique_sform.nii.gz', 'oblique sform')

# qform only: a proper rotation gives qfac +1, an improper one (one axis flipped) qfac -1.
for name, flip in (('qform_qfac_pos.nii', 1), ('qform_qfac_neg.nii', -1)):
    a = affine(rot(-0.4, 0.25, 1.1), (0.9, 1.1, 3.0 * flip), (10, -20, 30))
    img = nib.Nifti1Image(data(shape, np.float32), None)
    img.set_qform(a, code=1)
    img.set_sform(None, code=0)
    nib.save(img, os.path.join(out_dir, name))
    add(name, 'qform only', qfac=flip)

# pixdim only: both codes 0.
img = nib.Nifti1Image(data(shape, np.uint8), None)
img.header.set_zooms((0.7, 0.8, 2.5))
img.set_qform(None, code=0)
img.set_sform(None, code=0)
nib.save(img, os.path.join(out_dir, 'pixdim_only.nii'))
add('pixdim_only.nii', 'pixdim only')

# Every supported datatype in both byte orders, written raw so nibabel does not rescale.
for dt in ('uint8', 'int8', 'int16', 'uint16', 'int32', 'uint32', 'float32', 'float64'):
    for order, tag in (('<', 'le'), ('>', 'be')):
        hdr = nib.Nifti1Header(endianness=order)
        hdr.set_data_shape(shape)
        hdr.set_data_dtype(dt)
        hdr.set_sform(oblique, code=2)
        arr = data(shape, dt)
        name = f'dtype_{dt}_{tag}.nii'
        with open(os.path.join(out_dir, name), 'wb') as f:
            hdr.write_to(f)
            f.write(arr.astype(np.dtype(dt).newbyteorder(order)).tobytes(order='F'))
        add(name, 'datatype', datatype=dt, littleEndian=(order == '<'))

# Explicit scaling in a big-endian file, gzipped.
hdr = nib.Nifti1Header(endianness='>')
hdr.set_data_shape(shape)
hdr.set_data_dtype(np.int16)
hdr.set_sform(oblique, code=1)
hdr['scl_slope'] = 0.5
hdr['scl_inter'] = -1024
raw = data(shape, np.int16)
with gzip.open(os.path.join(out_dir, 'scaled_be.nii.gz'), 'wb') as f:
    hdr.write_to(f)
    f.write(raw.astype('>i2').tobytes(order='F'))
add('scaled_be.nii.gz', 'scaled', slope=0.5, inter=-1024)

# nibabel's own choice of scaling when floats are stored as int16.
img = nib.Nifti1Image(data(shape, np.float64) / 7.0, oblique)
img.set_data_dtype(np.int16)
nib.save(img, os.path.join(out_dir, 'scaled_auto.nii.gz'))
add('scaled_auto.nii.gz', 'scaled')

# 4-D: Falciform uses the first volume.
img = nib.Nifti1Image(data(shape + (3,), np.float32), oblique)
nib.save(img, os.path.join(out_dir, 'four_d.nii.gz'))
add('four_d.nii.gz', '4-D', volumes=3)

# NIfTI-2, big-endian, qform only.
hdr = nib.Nifti2Header(endianness='>')
hdr.set_data_shape(shape)
hdr.set_data_dtype(np.int16)
hdr.set_qform(affine(rot(0.2, 0.1, -0.3), (1.5, 1.5, 4.0), (1, 2, 3)), code=1)
hdr.set_sform(None, code=0)
with open(os.path.join(out_dir, 'nifti2_be.nii'), 'wb') as f:
    hdr.write_to(f)
    f.write(data(shape, np.int16).astype('>i2').tobytes(order='F'))
add('nifti2_be.nii', 'NIfTI-2 big-endian')

# .hdr/.img pairs, NIfTI-1 and NIfTI-2.
nib.save(nib.Nifti1Pair(data(shape, np.int16), oblique), os.path.join(out_dir, 'pair1.hdr'))
add('pair1.hdr', 'pair')
nib.save(nib.Nifti2Pair(data(shape, np.float32), oblique), os.path.join(out_dir, 'pair2.hdr'))
add('pair2.hdr', 'pair')

# Datatypes Falciform refuses.
for dt, code in (('int64', 1024), ('uint64', 1280), ('complex64', 32), ('complex128', 1792)):
    arr = data(shape, np.float32).astype(dt) if dt.startswith('complex') else data(shape, dt)
    img = nib.Nifti1Image(arr, oblique, dtype=dt)
    nib.save(img, os.path.join(out_dir, f'unsupported_{dt}.nii'))
    add(f'unsupported_{dt}.nii', 'unsupported', datatype=dt, code=code)
rgb = np.zeros(shape, dtype=[('R', 'u1'), ('G', 'u1'), ('B', 'u1')])
nib.save(nib.Nifti1Image(rgb, oblique), os.path.join(out_dir, 'unsupported_rgb24.nii'))
add('unsupported_rgb24.nii', 'unsupported', datatype='rgb24', code=128)

print(json.dumps(manifest))
