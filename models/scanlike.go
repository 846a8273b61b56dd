package models

import (
	"fmt"
	"math/rand/v2"

	"tapersweep/mesh"
)

// ScanLike makes a canal surface that looks like a segmented CBCT or micro-CT export: the
// exact canal is voxelised at `voxel` mm, its voxel boundary extracted (stair steps and
// all), and every vertex moved along its normal by a deterministic random amount in
// [-noise, +noise] mm drawn from seed. The result stays closed. It fails when the apical
// diameter is under 4 voxels (the tip would break up) or the noise could fold the surface.
func ScanLike(c *CanalSpec, voxel, noise float64, seed int64) (*mesh.Mesh, error) {
	if c == nil {
		return nil, fmt.Errorf("scan-like canal: no spec")
	}
	if err := c.Validate(); err != nil {
		return nil, fmt.Errorf("scan-like canal %q: %v", c.Name, err)
	}
	if !(voxel > 0) {
		return nil, fmt.Errorf("scan-like canal %q: voxel %g mm: want a positive size", c.Name, voxel)
	}
	if minD := min(c.ApicalD, c.OrificeD); minD < 4*voxel {
		return nil, fmt.Errorf("scan-like canal %q: apical diameter %.3g mm is under 4 voxels of %g mm; use a voxel of at most %.3g mm",
			c.Name, minD, voxel, minD/4)
	}
	if noise < 0 || noise > voxel/4 {
		return nil, fmt.Errorf("scan-like canal %q: noise %g mm: want 0 to a quarter voxel (%g mm)", c.Name, noise, voxel/4)
	}
	exact := c.Mesh(min(0.05, voxel/2), 96)
	grid, err := mesh.Voxelize(exact, voxel, 2, 0)
	if err != nil {
		return nil, fmt.Errorf("scan-like canal %q: %v", c.Name, err)
	}
	m := mesh.ExtractSurface(grid)
	if noise > 0 {
		normals := mesh.VertexNormals(m)
		rng := rand.New(rand.NewPCG(uint64(seed), 0x5ca11ce))
		for i := range m.Vertices {
			m.Vertices[i] = m.Vertices[i].Add(normals[i].Mul(noise * (2*rng.Float64() - 1)))
		}
	}
	return m, nil
}
