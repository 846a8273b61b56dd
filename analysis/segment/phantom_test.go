package segment

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
	"tapersweep/mesh/volume"
	"tapersweep/mesh/volume/volumetest"
)

func phantom(t testing.TB, args ...string) string { return volumetest.Phantom(t, args...) }

// exactPhantom is the geometry the scans were made from (see phantom.py).
type exactPhantom struct {
	Length   float64      `json:"length_mm"`
	Stations [][6]float64 `json:"stations"` // s, x, y, z, a, b
	Rings    []struct {
		S      float64      `json:"s"`
		Points [][3]float64 `json:"points"`
	} `json:"root_rings"`
	Voxel float64 `json:"voxel"`
}

func loadExact(t testing.TB, dir string) *exactPhantom {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, "exact.json"))
	if err != nil {
		t.Fatal(err)
	}
	var e exactPhantom
	if err := json.Unmarshal(b, &e); err != nil {
		t.Fatal(err)
	}
	return &e
}

func (e *exactPhantom) point(i int) mgl64.Vec3 {
	s := e.Stations[i]
	return mgl64.Vec3{s[1], s[2], s[3]}
}

// ends are the exact orifice and apical end.
func (e *exactPhantom) ends() Points {
	return Points{Orifice: e.point(0), Apex: e.point(len(e.Stations) - 1)}
}

// nearest returns the exact station nearest to p and the distance to the exact centerline
// (polyline of stations 0.05 mm apart).
func (e *exactPhantom) nearest(p mgl64.Vec3) (int, float64) {
	best, bd := 0, math.Inf(1)
	for i := range e.Stations {
		if d := e.point(i).Sub(p).Len(); d < bd {
			best, bd = i, d
		}
	}
	// distance to the two segments around the nearest station
	for _, j := range []int{best - 1, best} {
		if j < 0 || j+1 >= len(e.Stations) {
			continue
		}
		a, b := e.point(j), e.point(j+1)
		ab := b.Sub(a)
		u := math.Max(0, math.Min(1, p.Sub(a).Dot(ab)/ab.Dot(ab)))
		bd = math.Min(bd, p.Sub(a.Add(ab.Mul(u))).Len())
	}
	return best, bd
}

// diameter is the exact area-equivalent diameter at station i: 2 sqrt(a b).
func (e *exactPhantom) diameter(i int) float64 {
	return 2 * math.Sqrt(e.Stations[i][4]*e.Stations[i][5])
}

// rootMesh joins the exact root rings into a surface for distance queries.
func (e *exactPhantom) rootMesh() *mesh.Mesh {
	m := &mesh.Mesh{}
	n := len(e.Rings[0].Points)
	for _, r := range e.Rings {
		for _, p := range r.Points {
			m.Vertices = append(m.Vertices, mgl64.Vec3(p))
		}
	}
	for i := 0; i+1 < len(e.Rings); i++ {
		for j := range n {
			a, b := int32(i*n+j), int32(i*n+(j+1)%n)
			c, d := a+int32(n), b+int32(n)
			m.Triangles = append(m.Triangles, [3]int32{a, b, d}, [3]int32{a, d, c})
		}
	}
	return m
}

func openScan(t testing.TB, path string, opt volume.Options) *volume.Volume {
	t.Helper()
	v, err := volume.Open(context.Background(), path, opt)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

func volumeOptions() volume.Options { return volume.Options{} }
