package volume

import (
	"context"
	"path/filepath"
	"strings"
	"testing"
)

// refStack reads a folder of slices with Pillow (Debian python3-pil) in natural name order.
const refStack = `
import sys, json, glob, os, re
import numpy as np
from PIL import Image
files = sorted(glob.glob(os.path.join(sys.argv[1], '*')), key=lambda f: int(re.findall(r'\d+', os.path.basename(f))[0]))
vol = np.stack([np.array(Image.open(f)).astype(float) for f in files])  # [k, j, i]
rng = np.random.default_rng(3)
idx = [[int(rng.integers(0, vol.shape[2])), int(rng.integers(0, vol.shape[1])), int(rng.integers(0, vol.shape[0]))] for _ in range(200)]
print(json.dumps({"shape": [vol.shape[2], vol.shape[1], vol.shape[0]], "spacing": [0.02, 0.02], "origin": [0, 0, 0],
  "last": [0, 0, 0.02 * (vol.shape[0] - 1)], "iop": [1, 0, 0, 0, 1, 0], "idx": idx,
  "val": [float(vol[k, j, i]) for i, j, k in idx], "mean": float(vol.mean())}))
`

// 16-bit TIFF, 8-bit PNG and BMP stacks written by Pillow read as Pillow reads them; the
// slices come in natural order (slice2 before slice10), the voxel size is the user's.
func TestStacksAgainstPillow(t *testing.T) {
	dir := phantom(t, "--voxel", "0.3", "--factor", "1", "--formats", "tiff,png,bmp")
	for _, kind := range []string{"tiff", "png", "bmp"} {
		t.Run(kind, func(t *testing.T) {
			v := open(t, filepath.Join(dir, kind), Options{Voxel: 0.02})
			var ref refVolume
			pythonJSON(t, refStack, &ref, filepath.Join(dir, kind))
			compareWithReference(t, v, ref, 1e-9)
			if !strings.HasPrefix(v.Info.Format, strings.ToUpper(kind)) {
				t.Errorf("format %q", v.Info.Format)
			}
		})
	}
	if _, err := Open(context.Background(), filepath.Join(dir, "tiff"), Options{}); err == nil || !strings.Contains(err.Error(), "--voxel") {
		t.Errorf("a stack without a voxel size: %v", err)
	}
}

func TestNaturalOrder(t *testing.T) {
	names := []string{"s10.tif", "s2.tif", "s1.tif", "s010b.tif", "a.tif"}
	for i := range names {
		for j := i + 1; j < len(names); j++ {
			if naturalCompare(names[j], names[i]) < 0 {
				names[i], names[j] = names[j], names[i]
			}
		}
	}
	if got := strings.Join(names, " "); got != "a.tif s1.tif s2.tif s10.tif s010b.tif" {
		t.Errorf("order %s", got)
	}
}
