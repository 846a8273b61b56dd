package volume

import (
	"path/filepath"
	"testing"
)

// refNIfTI reads a NIfTI-1 file with nibabel (Debian python3-nibabel): the affine and the
// scaled voxel values (get_fdata applies scl_slope and scl_inter).
const refNIfTI = `
import sys, json
import numpy as np, nibabel as nib
img = nib.load(sys.argv[1])
vol = img.get_fdata()
aff = img.affine
rng = np.random.default_rng(3)
idx = [[int(rng.integers(0, vol.shape[a])) for a in range(3)] for _ in range(200)]
sp = [float(np.linalg.norm(aff[:3, a])) for a in range(3)]
ax = [(aff[:3, a] / sp[a]).tolist() for a in range(3)]
last = (aff @ np.array([0, 0, vol.shape[2] - 1, 1]))[:3]
print(json.dumps({"shape": list(vol.shape), "spacing": sp[:2], "origin": aff[:3, 3].tolist(), "last": last.tolist(),
  "iop": ax[0] + ax[1], "idx": idx, "val": [float(vol[i, j, k]) for i, j, k in idx], "mean": float(vol.mean())}))
`

// A .nii.gz written by nibabel reads as nibabel reads it, and holds the same scan as the
// DICOM series made from the same values.
func TestNIfTIAgainstNibabel(t *testing.T) {
	dir := phantom(t, "--voxel", "0.3", "--factor", "1", "--formats", "series,nifti", "--orientation", "tilted")
	v := open(t, filepath.Join(dir, "scan.nii.gz"), Options{})
	var ref refVolume
	pythonJSON(t, refNIfTI, &ref, filepath.Join(dir, "scan.nii.gz"))
	compareWithReference(t, v, ref, 1e-6)
	if v.Info.Label != "scan" || v.Info.Format != "NIfTI-1" {
		t.Errorf("info %+v", v.Info)
	}
	s := open(t, filepath.Join(dir, "series"), Options{})
	if s.Origin.Sub(v.Origin).Len() > 1e-4 || s.Axes[0].Sub(v.Axes[0]).Len() > 1e-5 {
		t.Errorf("NIfTI grid %v %v, DICOM %v %v", v.Origin, v.Axes, s.Origin, s.Axes)
	}
	for i := range s.Data {
		if s.Value(s.Data[i]) != v.Value(v.Data[i]) {
			t.Fatalf("voxel %d: NIfTI %g, DICOM %g", i, v.Value(v.Data[i]), s.Value(s.Data[i]))
		}
	}
}
