package analysis

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
)

// debianPython is the system interpreter, which sees Debian's python3-skimage.
const debianPython = "/usr/bin/python3"

// needTool skips a comparison with a reference tool when it is missing, except under CI,
// where the tool is installed by .ci/setup.sh and a missing one is a failure.
func needTool(t *testing.T, ok bool, what string) {
	t.Helper()
	if ok {
		return
	}
	if os.Getenv("CI") != "" {
		t.Fatalf("%s is missing (install it with bash .ci/setup.sh test)", what)
	}
	t.Skipf("%s is missing", what)
}

// TestCenterlineAgainstSkeleton compares the extracted centerline with the skeleton of the same
// voxelised canal by scikit-image (Lee, Kashyap, Chu, CVGIP 1994;56:462, as in
// skimage.morphology.skeletonize_3d; Debian python3-skimage): away from the ends, every station
// lies within one voxel of the skeleton.
func TestCenterlineAgainstSkeleton(t *testing.T) {
	out, err := exec.Command(debianPython, "-c", "import skimage.morphology; print('ok')").CombinedOutput()
	needTool(t, err == nil && strings.Contains(string(out), "ok"), "python3-skimage")
	spec := specJSON(t, `{"kind":"straight","length":8},{"kind":"arc","radius":5,"angle":45},{"kind":"straight","length":3}`, 1.0, 0.4, 0)
	c, err := CanalFromSpec(context.Background(), "skeleton", spec, CanalOptions{})
	if err != nil {
		t.Fatal(err)
	}
	h := 0.05
	g, err := mesh.Voxelize(c.Mesh, h, 2, 0)
	if err != nil {
		t.Fatal(err)
	}
	raw := make([]byte, len(g.Inside))
	for i, in := range g.Inside {
		if in {
			raw[i] = 1
		}
	}
	dir := t.TempDir()
	maskPath := filepath.Join(dir, "mask.raw")
	if err := os.WriteFile(maskPath, raw, 0o644); err != nil {
		t.Fatal(err)
	}
	// The grid is indexed i + NX*(j + NY*k): as a C-ordered array its shape is (NZ, NY, NX).
	script := fmt.Sprintf(`
import numpy as np
from skimage.morphology import skeletonize_3d
m = np.fromfile(%q, dtype=np.uint8).reshape((%d, %d, %d))
s = skeletonize_3d(m)
for k, j, i in zip(*np.nonzero(s)):
    print(i, j, k)
`, maskPath, g.NZ, g.NY, g.NX)
	cmd := exec.Command(debianPython, "-c", script)
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	if err := cmd.Run(); err != nil {
		t.Fatalf("skeletonize_3d: %v: %s", err, stderr.String())
	}
	var skel []mgl64.Vec3
	for _, line := range strings.Split(strings.TrimSpace(stdout.String()), "\n") {
		f := strings.Fields(line)
		if len(f) != 3 {
			continue
		}
		i, _ := strconv.Atoi(f[0])
		j, _ := strconv.Atoi(f[1])
		k, _ := strconv.Atoi(f[2])
		skel = append(skel, g.Center(i, j, k))
	}
	if len(skel) < 50 {
		t.Fatalf("the skeleton has only %d voxels", len(skel))
	}
	worst := 0.0
	L := c.Line.Length()
	for i, p := range c.Line.Points {
		if s := c.Line.S[i]; s < 1 || s > L-1 {
			continue // a skeleton's ends stop short of the caps
		}
		// Within one voxel: no coordinate differs from a skeleton voxel centre by more than
		// one voxel edge.
		best := math.Inf(1)
		for _, q := range skel {
			d := p.Sub(q)
			best = math.Min(best, math.Max(math.Abs(d[0]), math.Max(math.Abs(d[1]), math.Abs(d[2]))))
		}
		worst = math.Max(worst, best)
	}
	t.Logf("%d skeleton voxels; farthest station %.3f mm (largest coordinate) from the skeleton (voxel %.2f mm)", len(skel), worst, h)
	if worst > h {
		t.Errorf("a station lies %.3f mm (largest coordinate) from the skeleton, more than one voxel (%.2f mm)", worst, h)
	}
}
