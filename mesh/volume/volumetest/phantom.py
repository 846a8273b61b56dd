#!/usr/bin/env python3
"""Synthetic scans of one tooth root and its canal, from exactly known geometry.

Used by the Go tests of mesh/volume and analysis/segment. The scans are written with the
reference libraries themselves: DICOM with pydicom (Debian python3-pydicom), NIfTI-1 with
nibabel (python3-nibabel), slice stacks with Pillow (python3-pil); the blur comes from scipy.

Geometry (mm, phantom coordinates = the scan's patient/world coordinates):
  canal centerline: from the origin down -z, straight 6 mm, an arc of radius 6 mm and
  35 degrees bending toward +x, straight 4 mm (length L = 13.665 mm). Cross-section: an
  ellipse in the normal plane, semi-axis a along y (0.55 -> 0.12 mm) and b in the plane of
  the curve (0.35 -> 0.10 mm), both linear in arc length s: apical diameters 0.24 x 0.20 mm.
  Above the origin the root goes on straight to the top of the scan and the canal widens
  over 0.8 mm into a pulp chamber of semi-axes 1.6 (y) and 1.3 mm.
  root: around the same centerline, an ellipse of semi-axes 3.0 -> 1.0 mm (y) and
  2.2 -> 0.9 mm (in the plane), with a groove on the outer side of the curve (-x at the
  orifice) 0.6 -> 0.2 mm deep and 0.45 rad wide, rounded over the last 1.2 mm to close at
  s = L. Periodontal space: 0.2 mm around the root. Bone below z = -1.5, soft tissue above.
Intensities (Hounsfield-like CBCT grey values, from memory): pulp and periodontal space 40,
dentine 1600, bone 700, soft tissue 40. Point spread: Gaussian, sigma given in voxels.
Noise: Gaussian, sigma given (default 40).

Writes the scan(s) and exact.json (centerline stations and root rings in world mm).
"""
import argparse
import json
import os
import random

import numpy as np
from scipy import ndimage

L1, RC, THETA, L3 = 6.0, 6.0, np.radians(35.0), 4.0
L = L1 + RC * THETA + L3
A0, A1 = 0.55, 0.12   # canal semi-axis along y
CHAMBER_A, CHAMBER_B, CHAMBER_RISE = 1.6, 1.3, 0.8
B0, B1 = 0.35, 0.10   # canal semi-axis in the plane of the curve
RA0, RA1 = 3.0, 1.0   # root semi-axis along y
RB0, RB1 = 2.2, 0.9   # root semi-axis in the plane
G0, G1, GW = 0.6, 0.2, 0.45
TIP = 1.2
PDL = 0.2
CREST = -1.5
PULP, DENTINE, BONE, SOFT = 40.0, 1600.0, 700.0, 40.0

P1 = np.array([0.0, 0.0, -L1])
CC = np.array([RC, 0.0, -L1])
P2 = CC + RC * np.array([-np.cos(THETA), 0.0, -np.sin(THETA)])
T2 = np.array([np.sin(THETA), 0.0, -np.cos(THETA)])


def lerp(a, b, s):
    t = np.clip(s / L, 0.0, 1.0)
    return a + (b - a) * t


def centerline(s):
    """Point, tangent and in-plane normal (toward the centre of curvature) at arc length s."""
    s = float(s)
    if s <= L1:
        p = np.array([0.0, 0.0, -s])
        t = np.array([0.0, 0.0, -1.0])
    elif s <= L1 + RC * THETA:
        phi = (s - L1) / RC
        p = CC + RC * np.array([-np.cos(phi), 0.0, -np.sin(phi)])
        t = np.array([np.sin(phi), 0.0, -np.cos(phi)])
    else:
        p = P2 + (s - L1 - RC * THETA) * T2
        t = T2
    n = np.cross(t, [0.0, 1.0, 0.0])
    return p, t, n


def foot(x, y, z):
    """Arc length s and normal-plane coordinates (u in the plane of the curve, v = y) of the
    nearest centerline point, for arrays of points."""
    best = np.full(x.shape, np.inf)
    s_out = np.zeros(x.shape)
    u_out = np.zeros(x.shape)
    # straight part (extended up past the orifice)
    sa = np.minimum(-z, L1)
    fx, fz = 0.0, -sa
    d = (x - fx) ** 2 + y ** 2 + (z - fz) ** 2
    m = d < best
    best[m], s_out[m], u_out[m] = d[m], sa[m], (x - fx)[m]
    # arc
    wx, wz = x - CC[0], z - CC[2]
    phi = np.clip(np.arctan2(-wz, -wx), 0.0, THETA)
    fx = CC[0] - RC * np.cos(phi)
    fz = CC[2] - RC * np.sin(phi)
    d = (x - fx) ** 2 + y ** 2 + (z - fz) ** 2
    m = d < best
    nx, nz = np.cos(phi), np.sin(phi)  # toward the centre
    best[m], s_out[m] = d[m], (L1 + RC * phi)[m]
    u_out[m] = ((x - fx) * nx + (z - fz) * nz)[m]
    # last straight part (extended past the apex)
    q = np.maximum((x - P2[0]) * T2[0] + (z - P2[2]) * T2[2], 0.0)
    fx, fz = P2[0] + q * T2[0], P2[2] + q * T2[2]
    d = (x - fx) ** 2 + y ** 2 + (z - fz) ** 2
    m = d < best
    n2 = np.cross(T2, [0.0, 1.0, 0.0])
    best[m], s_out[m] = d[m], (L1 + RC * THETA + q)[m]
    u_out[m] = ((x - fx) * n2[0] + (z - fz) * n2[2])[m]
    return s_out, u_out, y


def root_radius(s, psi):
    a = lerp(RA0, RA1, s)
    b = lerp(RB0, RB1, s)
    r = 1.0 / np.sqrt((np.cos(psi) / b) ** 2 + (np.sin(psi) / a) ** 2)
    dpsi = np.angle(np.exp(1j * (psi - np.pi)))
    r = r - lerp(G0, G1, s) * np.exp(-(dpsi / GW) ** 2)
    tip = np.clip((s - (L - TIP)) / TIP, 0.0, None)
    return r * np.sqrt(np.clip(1.0 - tip ** 2, 0.0, 1.0))


def labels(x, y, z):
    """0 soft tissue, 1 bone, 2 periodontal space, 3 dentine, 4 canal; dentine is found here,
    the periodontal space is added later by dilation."""
    s, u, v = foot(x, y, z)
    sc = np.clip(s, 0.0, None)
    r = np.hypot(u, v)
    psi = np.arctan2(v, u)
    root = (r <= root_radius(sc, psi)) & (s <= L)
    up = np.clip(-s / CHAMBER_RISE, 0.0, 1.0)  # 0 at the orifice, 1 in the chamber
    ca = lerp(A0, A1, sc) + (CHAMBER_A - A0) * up
    cb = lerp(B0, B1, sc) + (CHAMBER_B - B0) * up
    canal = ((u / cb) ** 2 + (v / ca) ** 2 <= 1.0) & (s <= L)
    out = np.where(z < CREST, 1, 0).astype(np.uint8)
    out[root] = 3
    out[canal] = 4
    return out


def render(shape, origin, axes, spacing, factor, sigma_vox, noise, seed):
    """Intensity at the voxel centres: labels on a grid `factor` times finer, the
    periodontal space by dilating the root, Gaussian blur, block mean, noise."""
    fine_shape = tuple(n * factor for n in shape)
    fs = [sp / factor for sp in spacing]
    off = [(-0.5 + 0.5 / factor) * sp for sp in spacing]  # first fine sample in voxel 0
    lab = np.zeros(fine_shape, np.uint8)
    ii, jj = np.meshgrid(np.arange(fine_shape[0]), np.arange(fine_shape[1]), indexing="ij")
    for k in range(fine_shape[2]):
        pos = [np.asarray(origin, float)[c] + (off[0] + ii * fs[0]) * axes[0][c]
               + (off[1] + jj * fs[1]) * axes[1][c] + (off[2] + k * fs[2]) * axes[2][c]
               for c in range(3)]
        lab[:, :, k] = labels(pos[0], pos[1], pos[2])
    hard = lab >= 3
    dist = ndimage.distance_transform_edt(~hard, sampling=fs)
    pdl = (~hard) & (dist <= PDL)
    val = np.choose(lab, [SOFT, BONE, PULP, DENTINE, PULP]).astype(np.float32)
    val[pdl] = PULP
    del lab, hard, dist, pdl
    val = ndimage.gaussian_filter(val, sigma=sigma_vox * factor, mode="nearest")
    val = val.reshape(shape[0], factor, shape[1], factor, shape[2], factor).mean(axis=(1, 3, 5))
    rng = np.random.default_rng(seed)
    val = val + rng.normal(0.0, noise, val.shape)
    return val  # [i, j, k]


def exact(axes_note):
    st = []
    for s in np.arange(0.0, L + 1e-9, 0.05):
        p, t, n = centerline(s)
        a, b = lerp(A0, A1, s), lerp(B0, B1, s)
        st.append([round(float(s), 4)] + [float(c) for c in p] + [float(a), float(b)])
    rings = []
    psis = np.linspace(0, 2 * np.pi, 180, endpoint=False)
    for s in np.arange(0.0, L - TIP, 0.1):
        p, t, n = centerline(s)
        rr = root_radius(s, psis)
        ring = [(p + r * (np.cos(q) * n + np.sin(q) * np.array([0.0, 1.0, 0.0]))).tolist() for r, q in zip(rr, psis)]
        rings.append({"s": float(s), "points": ring})
    return {"length_mm": L, "stations": st, "root_rings": rings, "note": axes_note,
            "intensities": {"pulp": PULP, "dentine": DENTINE, "bone": BONE, "soft": SOFT}}


def grid_for(voxel, lo=(-3.6, -3.9, -14.2), hi=(5.6, 3.9, 1.2)):
    shape = tuple(int(np.ceil((h - l) / voxel)) + 1 for l, h in zip(lo, hi))
    return shape, list(lo)


PATIENT = {}


def base_dataset(pydicom, series_uid, study_uid, frame_uid, date):
    from pydicom.dataset import Dataset
    ds = Dataset()
    ds.Modality = "CT"
    ds.StudyInstanceUID = study_uid
    ds.SeriesInstanceUID = series_uid
    ds.FrameOfReferenceUID = frame_uid
    ds.SeriesDate = date
    ds.StudyDate = date
    ds.PatientName = PATIENT.get("name", "")
    ds.PatientID = PATIENT.get("id", "")
    ds.PatientBirthDate = PATIENT.get("birth", "")
    if PATIENT.get("institution"):
        ds.InstitutionName = PATIENT["institution"]
    ds.SamplesPerPixel = 1
    ds.PhotometricInterpretation = "MONOCHROME2"
    ds.BitsAllocated = 16
    ds.BitsStored = 16
    ds.HighBit = 15
    return ds


def finish(pydicom, ds, sop_class, path):
    from pydicom.dataset import FileMetaDataset
    from pydicom.uid import ExplicitVRLittleEndian, generate_uid
    meta = FileMetaDataset()
    meta.MediaStorageSOPClassUID = sop_class
    meta.MediaStorageSOPInstanceUID = generate_uid()
    meta.TransferSyntaxUID = ExplicitVRLittleEndian
    ds.file_meta = meta
    ds.SOPClassUID = sop_class
    ds.SOPInstanceUID = meta.MediaStorageSOPInstanceUID
    ds.is_little_endian = True
    ds.is_implicit_VR = False
    ds.save_as(path, write_like_original=False)


def stored(val, signed, intercept, slope):
    q = np.round((val - intercept) / slope)
    if signed:
        return np.clip(q, -32768, 32767).astype(np.int16)
    return np.clip(q, 0, 65535).astype(np.uint16)


def write_series(out, val, origin, axes, spacing, signed, intercept, slope, date, seed):
    import pydicom
    from pydicom.uid import generate_uid
    os.makedirs(out, exist_ok=True)
    series, study, frame = generate_uid(), generate_uid(), generate_uid()
    nz = val.shape[2]
    order = list(range(nz))
    random.Random(seed).shuffle(order)  # file names and instance numbers say nothing of the order
    for n, k in enumerate(order):
        ds = base_dataset(pydicom, series, study, frame, date)
        ds.Rows, ds.Columns = val.shape[1], val.shape[0]
        ds.PixelSpacing = [f"{spacing[1]:.6g}", f"{spacing[0]:.6g}"]
        ds.SliceThickness = f"{spacing[2]:.6g}"
        ds.ImageOrientationPatient = [f"{c:.6f}" for c in list(axes[0]) + list(axes[1])]
        pos = np.asarray(origin) + k * spacing[2] * np.asarray(axes[2])
        ds.ImagePositionPatient = [f"{c:.6f}" for c in pos]
        ds.InstanceNumber = n + 1
        ds.PixelRepresentation = 1 if signed else 0
        ds.RescaleIntercept = f"{intercept:g}"
        ds.RescaleSlope = f"{slope:g}"
        ds.PixelData = stored(val[:, :, k].T, signed, intercept, slope).tobytes()
        finish(pydicom, ds, "1.2.840.10008.5.1.4.1.1.2", os.path.join(out, f"IM{1000 + 7 * n}.dcm"))


def write_multiframe(path, val, origin, axes, spacing, signed, intercept, slope, date):
    import pydicom
    from pydicom.dataset import Dataset
    from pydicom.sequence import Sequence
    from pydicom.uid import generate_uid
    ds = base_dataset(pydicom, generate_uid(), generate_uid(), generate_uid(), date)
    nz = val.shape[2]
    ds.Rows, ds.Columns = val.shape[1], val.shape[0]
    ds.NumberOfFrames = nz
    ds.PixelRepresentation = 1 if signed else 0
    measures = Dataset()
    measures.PixelSpacing = [f"{spacing[1]:.6g}", f"{spacing[0]:.6g}"]
    measures.SliceThickness = f"{spacing[2]:.6g}"
    measures.SpacingBetweenSlices = f"{spacing[2]:.6g}"
    orient = Dataset()
    orient.ImageOrientationPatient = [f"{c:.6f}" for c in list(axes[0]) + list(axes[1])]
    scale = Dataset()
    scale.RescaleIntercept = f"{intercept:g}"
    scale.RescaleSlope = f"{slope:g}"
    scale.RescaleType = "HU"
    shared = Dataset()
    shared.PixelMeasuresSequence = Sequence([measures])
    shared.PlaneOrientationSequence = Sequence([orient])
    shared.PixelValueTransformationSequence = Sequence([scale])
    ds.SharedFunctionalGroupsSequence = Sequence([shared])
    frames = list(range(nz))[::-1]  # stored from the last slice to the first
    per = []
    for k in frames:
        pos = Dataset()
        pos.ImagePositionPatient = [f"{c:.6f}" for c in np.asarray(origin) + k * spacing[2] * np.asarray(axes[2])]
        item = Dataset()
        item.PlanePositionSequence = Sequence([pos])
        per.append(item)
    ds.PerFrameFunctionalGroupsSequence = Sequence(per)
    data = np.stack([stored(val[:, :, k].T, signed, intercept, slope) for k in frames])
    ds.PixelData = data.tobytes()
    finish(pydicom, ds, "1.2.840.10008.5.1.4.1.1.2.1", path)


def write_nifti(path, val, origin, axes, spacing, intercept, slope):
    import nibabel as nib
    aff = np.eye(4)
    for c in range(3):
        aff[:3, c] = np.asarray(axes[c]) * spacing[c]
    aff[:3, 3] = origin
    img = nib.Nifti1Image(stored(val, True, intercept, slope), aff)
    img.header.set_xyzt_units("mm")
    img.header.set_slope_inter(slope, intercept)
    img.header.set_qform(aff, code=1)
    img.header.set_sform(aff, code=1)
    nib.save(img, path)


def write_stack(out, val, kind, bits):
    from PIL import Image
    os.makedirs(out, exist_ok=True)
    lo, hi = float(val.min()), float(val.max())
    for k in range(val.shape[2]):
        sl = val[:, :, k].T
        if bits == 16:
            img = Image.fromarray(np.clip(np.round(sl), 0, 65535).astype(np.uint16), mode="I;16")
        else:
            img = Image.fromarray(np.clip(np.round(sl), 0, 255).astype(np.uint8), mode="L")
        img.save(os.path.join(out, f"slice{k}.{kind}"))


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--out", required=True)
    ap.add_argument("--voxel", type=float, default=0.15)
    ap.add_argument("--sigma", type=float, default=1.2, help="point spread, voxels")
    ap.add_argument("--noise", type=float, default=40.0)
    ap.add_argument("--factor", type=int, default=3, help="supersampling of the labels")
    ap.add_argument("--formats", default="series", help="comma list: series, multiframe, nifti, tiff, png, bmp")
    ap.add_argument("--orientation", default="axial", help="axial, or tilted (axes turned about z by 30 degrees)")
    ap.add_argument("--box", default="", help="lo_x,lo_y,lo_z,hi_x,hi_y,hi_z in mm (default: the whole root)")
    ap.add_argument("--signed", action="store_true")
    ap.add_argument("--slope", type=float, default=1.0)
    ap.add_argument("--intercept", type=float, default=-1024.0)
    ap.add_argument("--patient", default="", help="name|id|birth date|institution (made up) for the headers")
    ap.add_argument("--date", default="20240611")
    ap.add_argument("--seed", type=int, default=7)
    a = ap.parse_args()
    if a.patient:
        f = a.patient.split("|")
        PATIENT.update(name=f[0], id=f[1], birth=f[2], institution=f[3])
    if a.box:
        b = [float(x) for x in a.box.split(",")]
        shape, origin = grid_for(a.voxel, b[:3], b[3:])
    else:
        shape, origin = grid_for(a.voxel)
    axes = [[1.0, 0.0, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]]
    if a.orientation == "tilted":
        c, s = np.cos(np.radians(30)), np.sin(np.radians(30))
        axes = [[c, s, 0.0], [-s, c, 0.0], [0.0, 0.0, 1.0]]
        # turn the grid about the box centre so it still covers the root
        ctr = np.array(origin) + (np.array(shape) - 1) * a.voxel / 2
        origin = list(ctr - sum((np.array(shape[i]) - 1) * a.voxel / 2 * np.array(axes[i]) for i in range(3)))
    spacing = [a.voxel] * 3
    val = render(shape, origin, axes, spacing, a.factor, a.sigma, a.noise, a.seed)
    os.makedirs(a.out, exist_ok=True)
    for fmt in a.formats.split(","):
        if fmt == "series":
            write_series(os.path.join(a.out, "series"), val, origin, axes, spacing, a.signed, a.intercept, a.slope, a.date, a.seed)
        elif fmt == "multiframe":
            write_multiframe(os.path.join(a.out, "multiframe.dcm"), val, origin, axes, spacing, a.signed, a.intercept, a.slope, a.date)
        elif fmt == "nifti":
            write_nifti(os.path.join(a.out, "scan.nii.gz"), val, origin, axes, spacing, a.intercept, a.slope)
        elif fmt in ("tiff", "png", "bmp"):
            # stacks: pulp at 10 % and dentine at 90 % of the 8- or 16-bit range
            bits = 16 if fmt == "tiff" else 8
            top = 65535.0 if bits == 16 else 255.0
            v = (val - PULP) / (DENTINE - PULP) * 0.8 * top + 0.1 * top
            write_stack(os.path.join(a.out, fmt), v, fmt, bits)
    info = exact(f"grid {shape} origin {origin} axes {axes} voxel {a.voxel}")
    info.update(shape=list(shape), origin=[float(c) for c in origin], axes=axes, voxel=a.voxel)
    with open(os.path.join(a.out, "exact.json"), "w") as f:
        json.dump(info, f)


if __name__ == "__main__":
    main()
