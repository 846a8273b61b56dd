package mesh

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh/parallel"
)

// corner32 is a corner of a binary STL as the file holds it: the bits of its three float32
// coordinates. A binary file is welded on these (12 bytes a corner) rather than on float64
// copies, which would be written and read again several times over.
type corner32 [3]uint32

// position is the corner in mm: its float32 coordinates times s.
func (c *corner32) position(s float64) mgl64.Vec3 {
	return mgl64.Vec3{
		float64(math.Float32frombits(c[0])) * s,
		float64(math.Float32frombits(c[1])) * s,
		float64(math.Float32frombits(c[2])) * s,
	}
}

// fold32 turns -0 into 0, so that equal bits mean equal numbers (coordinates are finite).
func fold32(b uint32) uint32 {
	if b == 0x80000000 {
		return 0
	}
	return b
}

// hash32 mixes folded coordinate bits: the top bits pick a corner's block, bits 32 and up
// its slot in the block's table.
func hash32(x, y, z uint32) uint64 {
	return (uint64(x)<<32|uint64(y))*0x9E3779B97F4A7C15 ^ uint64(z)*0xC2B2AE3D27D4EB4F
}

// keyedCorner is a corner's folded bits and its index, grouped with the others of its block.
type keyedCorner struct {
	x, y, z uint32
	i       int32
}

// cornerGroups finds identical corners of a binary STL whatever the order of its triangles:
// the corners are grouped by the top bits of their hash into blocks that fit the L2 cache
// (each block in corner order), and each block is deduplicated through a small table. Every
// corner is read in order and written once into its block, so a file whose triangles are
// scattered costs what an ordered one does.
type cornerGroups struct {
	keys    []corner32
	chunk   int // corners per chunk, as the reader decodes them
	chunks  int
	shift   uint // block = hash >> shift
	blocks  int
	perPart []int32 // perPart[c*blocks+b]: corners of chunk c in block b
}

func newCornerGroups(keys []corner32, chunk int) *cornerGroups {
	bits := uint(0)
	for len(keys)>>bits > dedupBlock {
		bits++
	}
	g := &cornerGroups{keys: keys, chunk: chunk, chunks: (len(keys) + chunk - 1) / chunk, shift: 64 - bits, blocks: 1 << bits}
	g.perPart = make([]int32, g.chunks*g.blocks)
	return g
}

// count tallies the blocks of chunk c's corners; the reader calls it for every chunk, on
// any goroutine, once the chunk is decoded (and still in the cache).
func (g *cornerGroups) count(c int) {
	n := g.perPart[c*g.blocks : (c+1)*g.blocks]
	for i := c * g.chunk; i < min(len(g.keys), (c+1)*g.chunk); i++ {
		k := &g.keys[i]
		n[hash32(fold32(k[0]), fold32(k[1]), fold32(k[2]))>>g.shift]++
	}
}

// first returns, once every chunk is counted, for every corner the first corner with the
// same coordinates (-0 equal to 0): itself for the first of each position.
func (g *cornerGroups) first(workers int) []int32 {
	nb := g.blocks
	// Block-major, chunk-minor places: each block holds its corners in ascending order, so
	// the first of a position found in a block is the first in the file.
	start := make([]int32, nb+1)
	at := int32(0)
	for b := range nb {
		start[b] = at
		for c := range g.chunks {
			n := g.perPart[c*nb+b]
			g.perPart[c*nb+b] = at
			at += n
		}
	}
	start[nb] = at
	recs := make([]keyedCorner, len(g.keys))
	parallel.For(workers, g.chunks, func(_, c int) {
		place := g.perPart[c*nb : (c+1)*nb]
		for i := c * g.chunk; i < min(len(g.keys), (c+1)*g.chunk); i++ {
			k := &g.keys[i]
			x, y, z := fold32(k[0]), fold32(k[1]), fold32(k[2])
			b := hash32(x, y, z) >> g.shift
			recs[place[b]] = keyedCorner{x, y, z, int32(i)}
			place[b]++
		}
	})
	first := make([]int32, len(g.keys))
	dedupKeyed(first, recs, start, workers)
	return first
}

// dedupKeyed sets first[i] for every corner of every block recs[start[b]:start[b+1]] (each in
// ascending corner order) to the first corner of its block with the same folded bits: itself
// for the first of each position.
func dedupKeyed(first []int32, recs []keyedCorner, start []int32, workers int) {
	nb := len(start) - 1
	k := min(parallel.Workers(workers, nb), maxDedupWorkers)
	tables := make([][]int32, k)
	parallel.For(k, nb, func(w, b int) {
		blk := recs[start[b]:start[b+1]]
		size := 16
		for size < 2*len(blk) {
			size <<= 1
		}
		if cap(tables[w]) < size {
			tables[w] = make([]int32, size)
		}
		table := tables[w][:size]
		for i := range table {
			table[i] = -1
		}
		mask := uint64(size - 1)
		for j := range blk {
			p := &blk[j]
			s := hash32(p.x, p.y, p.z) >> 32 & mask
			for {
				e := table[s]
				if e < 0 {
					table[s] = int32(j)
					first[p.i] = p.i
					break
				}
				if q := &blk[e]; q.x == p.x && q.y == p.y && q.z == p.z {
					first[p.i] = q.i
					break
				}
				s = (s + 1) & mask
			}
		}
	})
}

// distinctPositions lists, in corner order, the position (times s) of every corner that is
// the first of its position, stretches of corners on every core, and returns
// distinctStarts(first) as well.
func distinctPositions(keys []corner32, first []int32, s float64, workers int) ([]mgl64.Vec3, []int32) {
	starts := distinctStarts(first, workers)
	n := 0
	if len(starts) > 0 {
		last := len(starts) - 1
		n = int(starts[last])
		for i := last * cornerStretch; i < len(first); i++ {
			if int(first[i]) == i {
				n++
			}
		}
	}
	pos := make([]mgl64.Vec3, n)
	parallel.For(workers, len(starts), func(_, st int) {
		d := starts[st]
		for i := st * cornerStretch; i < min(len(first), (st+1)*cornerStretch); i++ {
			if int(first[i]) == i {
				pos[d] = keys[i].position(s)
				d++
			}
		}
	})
	return pos, starts
}

// minInjectiveScale is the smallest scale that keeps distinct float32 values distinct: the
// smallest float32 above zero (2^-149) times it is still a normal float64 (2^-1022), which
// carries all 24 bits of any float32. Below it (never a real unit) the corners are welded
// as float64.
var minInjectiveScale = math.Ldexp(1, -873)

// The two passes below read a binary file's corners in file order where the welded mesh
// would be read through its vertex indices, at random in a file whose triangles are
// scattered. They hold only while the weld merged identical corners alone: then triangle t's
// vertices are its corners, whose coordinates equal the vertices' (the sign of a zero aside,
// which changes no comparison with zero and no non-zero result: a sum of zeros from +0 stays
// +0).

// cornerChecks tells which triangles isDegenerate would find degenerate in the welded mesh,
// and each triangle's term of SumTriangles' signed volume were none dropped (vertex 0 is
// corner 0), on up to workers cores.
func cornerChecks(keys []corner32, s float64, workers int) (degenerate []bool, terms []float64) {
	nt := len(keys) / 3
	degenerate = make([]bool, nt)
	terms = make([]float64, nt)
	if nt == 0 {
		return
	}
	// Scalars rather than mgl64.Vec3 (arrays the compiler keeps in memory), with the very
	// operations of isDegenerate and of SumTriangles' signed volume, in their order.
	ref := keys[0].position(s)
	rx, ry, rz := ref[0], ref[1], ref[2]
	coord := func(bits uint32) float64 { return float64(math.Float32frombits(bits)) * s }
	parallel.For(workers, (nt+triangleStretch-1)/triangleStretch, func(_, st int) {
		for t := st * triangleStretch; t < min(nt, (st+1)*triangleStretch); t++ {
			c := (*[3]corner32)(keys[3*t : 3*t+3])
			ax, ay, az := coord(c[0][0]), coord(c[0][1]), coord(c[0][2])
			bx, by, bz := coord(c[1][0]), coord(c[1][1]), coord(c[1][2])
			dx, dy, dz := coord(c[2][0]), coord(c[2][1]), coord(c[2][2])
			ux, uy, uz := bx-ax, by-ay, bz-az
			vx, vy, vz := dx-ax, dy-ay, dz-az
			// Two equal corners (isDegenerate's repeated vertex) give a zero cross product
			// too: u or v is zero, or u equals v.
			degenerate[t] = uy*vz-uz*vy == 0 && uz*vx-ux*vz == 0 && ux*vy-uy*vx == 0
			terms[t] = tripleProduct(ax-rx, ay-ry, az-rz, bx-rx, by-ry, bz-rz, dx-rx, dy-ry, dz-rz)
		}
	})
	return degenerate, terms
}

// sumVolume is SumTriangles' signed volume from its terms: the same sum in the same order.
func sumVolume(terms []float64) float64 {
	vol := 0.0
	for _, v := range terms {
		vol += v
	}
	return vol / 6
}
