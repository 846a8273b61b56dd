package models

import (
	_ "embed"
	"encoding/json"
	"fmt"

	"tapersweep/mesh"
)

// The built-in demo scenario: an invented canal and an invented sequence, marked as demo.
var (
	//go:embed demo/canal.json
	demoCanalJSON []byte
	//go:embed demo/sequence.json
	demoSequenceJSON []byte
)

// DemoCanalJSON returns the demo canal spec (invented) as stored.
func DemoCanalJSON() []byte { return append([]byte(nil), demoCanalJSON...) }

// DemoSequenceJSON returns the demo sequence (invented) as stored.
func DemoSequenceJSON() []byte { return append([]byte(nil), demoSequenceJSON...) }

// DemoCanal returns the parsed demo canal. The embedded file is checked by the tests, so
// a parse failure here is a build mistake.
func DemoCanal() *CanalSpec {
	c, err := ParseCanalSpec("demo/canal.json", demoCanalJSON)
	if err != nil {
		panic(err)
	}
	return c
}

// ExampleCanal is one of the invented test canals written to testdata/ by cmd/maketestdata.
// A parametric one is meshed with ExampleMeshDS and ExampleMeshAround; a scan-like one
// goes through ScanLike with its Voxel, Noise and Seed.
type ExampleCanal struct {
	File     string // file name without extension: File.json (spec) and File.stl
	Spec     *CanalSpec
	ScanLike bool
	Voxel    float64
	Noise    float64
	Seed     int64
}

// Meshing of the parametric examples: coarse enough to keep each STL well under 1 MB.
const (
	ExampleMeshDS     = 0.15
	ExampleMeshAround = 32
)

// Mesh returns the example's surface as written to File.stl.
func (e ExampleCanal) Mesh() (*mesh.Mesh, error) {
	if e.ScanLike {
		return ScanLike(e.Spec, e.Voxel, e.Noise, e.Seed)
	}
	return e.Spec.Mesh(ExampleMeshDS, ExampleMeshAround), nil
}

// SpecJSON returns the example's spec as written to File.json.
func (e ExampleCanal) SpecJSON() ([]byte, error) {
	b, err := json.MarshalIndent(e.Spec, "", "  ")
	if err != nil {
		return nil, err
	}
	return append(b, '\n'), nil
}

func exampleSpec(name string, orifice, apical, oval float64, segs ...CanalSegment) *CanalSpec {
	c := &CanalSpec{Name: name, Segments: segs, OrificeD: orifice, ApicalD: apical, Oval: oval}
	if err := c.Validate(); err != nil {
		panic(fmt.Sprintf("example canal %s: %v", name, err))
	}
	c.path = buildCanalPath(c)
	return c
}

func straightSeg(l float64) CanalSegment { return CanalSegment{Kind: "straight", Length: l} }
func arcSeg(r, deg, turn float64) CanalSegment {
	return CanalSegment{Kind: "arc", Radius: r, Angle: deg, PlaneTurn: turn}
}

// ExampleCanals lists the invented test canals in a fixed order: a straight cone, single
// curves of 20, 45 and 70 degrees on radii of 3, 5 and 10 mm, an S-curve, a curve that
// leaves its plane, an oval canal, and scan-like copies of a curved and an oval canal.
func ExampleCanals() []ExampleCanal {
	var out []ExampleCanal
	add := func(file string, c *CanalSpec) { out = append(out, ExampleCanal{File: file, Spec: c}) }
	add("straight", exampleSpec("test canal: straight cone (invented)", 1.0, 0.3, 0, straightSeg(16)))
	for _, deg := range []float64{20, 45, 70} {
		for _, r := range []float64{3, 5, 10} {
			name := fmt.Sprintf("test canal: %g deg curve on a %g mm radius (invented)", deg, r)
			add(fmt.Sprintf("curve_%gdeg_r%g", deg, r),
				exampleSpec(name, 1.0, 0.3, 0, straightSeg(8), arcSeg(r, deg, 0), straightSeg(2)))
		}
	}
	add("s_curve", exampleSpec("test canal: S-curve (invented)", 1.0, 0.3, 0,
		straightSeg(7), arcSeg(5, 30, 0), arcSeg(4, 40, 180), straightSeg(1.5)))
	add("curve_3d", exampleSpec("test canal: curve leaving its plane (invented)", 1.0, 0.3, 0,
		straightSeg(7), arcSeg(6, 30, 0), arcSeg(4, 35, 90), straightSeg(1)))
	add("oval", exampleSpec("test canal: oval 1.6 (invented)", 1.2, 0.4, 1.6,
		straightSeg(8), arcSeg(6, 30, 0), straightSeg(3)))
	out = append(out,
		ExampleCanal{File: "scanlike_curve", ScanLike: true, Voxel: 0.09, Noise: 0.015, Seed: 1,
			Spec: exampleSpec("test canal: scan-like 40 deg curve, voxel 0.09 mm (invented)", 1.0, 0.38, 0,
				straightSeg(8), arcSeg(5, 40, 0), straightSeg(2))},
		ExampleCanal{File: "scanlike_oval", ScanLike: true, Voxel: 0.1, Noise: 0.02, Seed: 2,
			Spec: exampleSpec("test canal: scan-like oval 1.5, voxel 0.1 mm (invented)", 1.2, 0.4, 1.5,
				straightSeg(8), arcSeg(6, 30, 0), straightSeg(3))},
	)
	return out
}
