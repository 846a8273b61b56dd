package segment

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/analysis"
	"tapersweep/mesh/volume"
)

// box is a block of a volume's intensities as float32, possibly coarser by an integer step
// (each sample the mean of step^3 voxels), lightly smoothed so single noisy voxels do not
// steer the path or the threshold.
type box struct {
	vol        *volume.Volume
	i0, j0, k0 int // first voxel of the block in the volume
	nx, ny, nz int
	step       int
	val        []float32
}

// newBox copies the voxels [lo, hi] (index coordinates, clamped to the grid) at the given step.
func newBox(v *volume.Volume, lo, hi [3]int, step int, smooth bool) *box {
	for a, n := range []int{v.NX, v.NY, v.NZ} {
		lo[a] = max(0, min(lo[a], n-1))
		hi[a] = max(lo[a], min(hi[a], n-1))
	}
	b := &box{vol: v, i0: lo[0], j0: lo[1], k0: lo[2], step: step}
	b.nx = (hi[0]-lo[0])/step + 1
	b.ny = (hi[1]-lo[1])/step + 1
	b.nz = (hi[2]-lo[2])/step + 1
	b.val = make([]float32, b.nx*b.ny*b.nz)
	analysis.ParallelFor(b.nz, func(k int) {
		for j := range b.ny {
			for i := range b.nx {
				sum, n := 0.0, 0
				for dk := range step {
					z := b.k0 + k*step + dk
					if z >= v.NZ {
						break
					}
					for dj := range step {
						y := b.j0 + j*step + dj
						if y >= v.NY {
							break
						}
						row := v.Index(0, y, z)
						for di := range step {
							x := b.i0 + i*step + di
							if x >= v.NX {
								break
							}
							sum += float64(v.Data[row+x])
							n++
						}
					}
				}
				b.val[b.index(i, j, k)] = float32(v.Value(uint16(0)) + v.Slope*sum/float64(n))
			}
		}
	})
	if smooth {
		b.smooth()
	}
	return b
}

func (b *box) index(i, j, k int) int { return i + b.nx*(j+b.ny*k) }

func (b *box) ijk(n int) (int, int, int) { return n % b.nx, (n / b.nx) % b.ny, n / (b.nx * b.ny) }

// volIndex is the centre of sample (i, j, k) in the volume's index coordinates.
func (b *box) volIndex(i, j, k int) mgl64.Vec3 {
	c := 0.5 * float64(b.step-1)
	return mgl64.Vec3{float64(b.i0+i*b.step) + c, float64(b.j0+j*b.step) + c, float64(b.k0+k*b.step) + c}
}

// world is the centre of sample n in mm.
func (b *box) world(n int) mgl64.Vec3 {
	i, j, k := b.ijk(n)
	return b.vol.World(b.volIndex(i, j, k))
}

// sampleOf is the sample nearest to a point in mm (clamped to the box).
func (b *box) sampleOf(w mgl64.Vec3) int {
	p := b.vol.IndexOf(w)
	c := 0.5 * float64(b.step-1)
	i := int(math.Round((p[0] - float64(b.i0) - c) / float64(b.step)))
	j := int(math.Round((p[1] - float64(b.j0) - c) / float64(b.step)))
	k := int(math.Round((p[2] - float64(b.k0) - c) / float64(b.step)))
	return b.index(max(0, min(i, b.nx-1)), max(0, min(j, b.ny-1)), max(0, min(k, b.nz-1)))
}

// spacing is the edge of a sample along each axis, mm.
func (b *box) spacing() [3]float64 {
	s := float64(b.step)
	return [3]float64{b.vol.Spacing[0] * s, b.vol.Spacing[1] * s, b.vol.Spacing[2] * s}
}

// smooth applies the binomial filter [1 2 1]/4 along each axis (about a Gaussian of half a
// sample); edges repeat their last sample.
func (b *box) smooth() {
	tmp := make([]float32, len(b.val))
	pass := func(src, dst []float32, n, stride int, lines func(fn func(start int))) {
		lines(func(start int) {
			for q := range n {
				c := start + q*stride
				lo, hi := c, c
				if q > 0 {
					lo = c - stride
				}
				if q < n-1 {
					hi = c + stride
				}
				dst[c] = 0.25*src[lo] + 0.5*src[c] + 0.25*src[hi]
			}
		})
	}
	nx, ny, nz := b.nx, b.ny, b.nz
	pass(b.val, tmp, nx, 1, func(fn func(int)) {
		analysis.ParallelFor(nz, func(k int) {
			for j := range ny {
				fn(nx * (j + ny*k))
			}
		})
	})
	pass(tmp, b.val, ny, nx, func(fn func(int)) {
		analysis.ParallelFor(nz, func(k int) {
			for i := range nx {
				fn(i + nx*ny*k)
			}
		})
	})
	pass(b.val, tmp, nz, nx*ny, func(fn func(int)) {
		analysis.ParallelFor(ny, func(j int) {
			for i := range nx {
				fn(i + nx*j)
			}
		})
	})
	b.val = tmp
}
