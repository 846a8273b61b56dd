package mesh

import (
	"bytes"
	"context"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"os"
	"sync"
	"sync/atomic"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh/parallel"
)

// LoadOptions tune reading an STL surface.
type LoadOptions struct {
	// Scale multiplies every coordinate (0 means 1), e.g. 0.001 for a file in micrometres.
	Scale float64
	// Progress, if set, is called now and then with the bytes read so far and the total.
	Progress func(doneBytes, totalBytes int64)
	// Workers is the number of goroutines the weld may keep busy; 0 uses every core. The mesh
	// does not depend on it.
	Workers int
}

// LoadReport tells what was read and what looked wrong.
type LoadReport struct {
	Format            string // "binary" or "ascii"
	TrianglesRead     int
	DegenerateRemoved int
	Vertices          int
	// Turned counts triangles that faced the other way from their neighbours (or a whole
	// inside-out surface) and were turned over.
	Turned int
	// Solids is the number of "solid ... endsolid" blocks of an ASCII file (every one is read).
	Solids int
	// Surface is the check of the welded surface (closed, manifold, shells, orientation).
	Surface Report
	// Warnings are plain-language problems, each with a way to fix it: the surface's own
	// (Validate's) followed by Notes.
	Warnings []string
	// Notes are what reading found beyond the surface's shape: facets skipped, triangles
	// removed, units that look wrong, a very large mesh. A caller that validates the mesh
	// itself uses only these.
	Notes []string
}

const (
	stlHeaderSize = 84
	stlRecordSize = 50
	// largeMeshTriangles is where a warning about time and memory starts.
	largeMeshTriangles = 2_000_000
	// A canal surface fits in a box a few tens of millimetres across.
	micrometreDiagonal = 150.0
	metreDiagonal      = 1.0
	// weldRelTol merges corners closer than this fraction of the largest coordinate: about
	// the rounding of float32 coordinates (6e-8 relative), far below any real edge.
	weldRelTol = 1e-7
)

// MaxTriangles is the most triangles a surface may have: about 30 times a fine canal scan,
// and what keeps reading, welding and measuring one surface within a few GB of memory.
const MaxTriangles = 8_000_000

// MaxSTLBytes is the largest STL file read: MaxTriangles as ASCII text at about 250 bytes a
// facet. A binary file is bounded by its triangle count first.
const MaxSTLBytes = 2 << 30

// LoadFile reads a binary or ASCII STL file; see Load. It refuses what is not a regular file.
func LoadFile(ctx context.Context, path string, opt LoadOptions) (*Mesh, LoadReport, error) {
	f, size, err := OpenInput(path, MaxSTLBytes)
	if err != nil {
		return nil, LoadReport{}, err
	}
	defer f.Close()
	return Load(ctx, path, f, size, opt)
}

// Load reads a binary or ASCII STL surface from r (size bytes long; where seeking to the end
// works and reports another length, the seek wins), welds it, drops degenerate triangles and validates
// it. Problems that still leave a usable surface become warnings in the report; anything else
// is an error naming name and the place in the file. Cancelling ctx stops the read.
func Load(ctx context.Context, name string, r io.ReadSeeker, size int64, opt LoadOptions) (*Mesh, LoadReport, error) {
	var rep LoadReport
	if ctx == nil {
		ctx = context.Background()
	}
	scale := opt.Scale
	if scale == 0 {
		scale = 1
	}
	if !(scale > 0) || math.IsInf(scale, 0) {
		return nil, rep, fmt.Errorf("%s: scale must be a positive number, not %v", name, opt.Scale)
	}
	if end, err := r.Seek(0, io.SeekEnd); err == nil {
		size = end
	} else if size <= 0 {
		return nil, rep, fmt.Errorf("%s: cannot find the file's length: %w", name, err)
	}
	if size == 0 {
		return nil, rep, fmt.Errorf("%s: the file is empty", name)
	}
	if size > MaxSTLBytes {
		return nil, rep, fmt.Errorf("%s: %s, more than the %s an STL surface may have here", name, byteSize(size), byteSize(MaxSTLBytes))
	}
	head := make([]byte, min(size, 2048))
	if _, err := r.Seek(0, io.SeekStart); err != nil {
		return nil, rep, fmt.Errorf("%s: %w", name, err)
	}
	if _, err := io.ReadFull(r, head); err != nil {
		return nil, rep, fmt.Errorf("%s: cannot read the start of the file: %w", name, err)
	}
	if _, err := r.Seek(0, io.SeekStart); err != nil {
		return nil, rep, fmt.Errorf("%s: %w", name, err)
	}
	rd := &stlReader{ctx: ctx, name: name, scale: scale, r: r, size: size, progress: opt.Progress, workers: opt.Workers}
	var err error
	if looksASCII(head) {
		rep.Format = "ascii"
		err = rd.readASCII()
		rep.Solids = rd.solids
	} else {
		rep.Format = "binary"
		err = rd.readBinary(head)
	}
	if err != nil {
		return nil, rep, err
	}
	rep.TrianglesRead = rd.cornerCount() / 3
	if rep.TrianglesRead == 0 {
		if len(rd.problems) > 0 {
			return nil, rep, fmt.Errorf("%s: no triangle could be read: %s", name, rd.problems[0])
		}
		return nil, rep, fmt.Errorf("%s: the file holds no triangles", name)
	}
	if err := ctx.Err(); err != nil {
		return nil, rep, fmt.Errorf("%s: loading stopped: %w", name, err)
	}
	// The outlier check (a sample sorted on one core) runs beside the weld, whose mesh is
	// dropped if it fails.
	outliers := make(chan error, 1)
	go func() { outliers <- rd.checkOutliers() }()
	m := rd.weld(opt.Workers)
	if err := <-outliers; err != nil {
		return nil, rep, err
	}
	// When the weld merged only identical corners, the corners in file order hold each
	// triangle's vertices: reading them there beats gathering vertices at random, as a file
	// whose triangles are scattered makes every per-triangle pass do.
	var degenerate []bool
	var terms []float64
	if rd.keys != nil && rd.distinct == len(m.Vertices) {
		degenerate, terms = cornerChecks(rd.keys, rd.scale, opt.Workers)
	}
	rd.corners, rd.keys, rd.first = nil, nil, nil
	m, removed := dropDegenerate(m, degenerate, opt.Workers)
	rep.DegenerateRemoved = removed
	// Degenerate triangles are gone already; the signed volume is summed from the corners'
	// terms when they are known.
	sums := func() TriangleSums { return TriangleSums{SignedVolume: signedVolume(m)} }
	if terms != nil && removed == 0 {
		sums = func() TriangleSums { return TriangleSums{SignedVolume: sumVolume(terms)} }
	}
	if len(m.Triangles) == 0 {
		return nil, rep, fmt.Errorf("%s: all %d triangles have zero area or a repeated corner", name, rep.TrianglesRead)
	}
	rep.Vertices = len(m.Vertices)
	if err := ctx.Err(); err != nil {
		return nil, rep, fmt.Errorf("%s: loading stopped: %w", name, err)
	}
	// The weld made every vertex of a corner, and dropping triangles dropped the vertices only
	// they used.
	rep.Surface = validate(m, sums, opt.Workers, true)
	if rep.Surface.InconsistentOrientation > 0 || rep.Surface.Closed && rep.Surface.SignedVolume < 0 {
		rep.Turned = OrientConsistently(m)
		rep.Surface = validate(m, func() TriangleSums { return TriangleSums{SignedVolume: signedVolume(m)} }, opt.Workers, true)
	}
	rep.Notes = append(rd.notes(), loadNotes(m, rep)...)
	rep.Warnings = append(rep.Surface.Warnings(), rep.Notes...)
	return m, rep, nil
}

// weld welds the corners read (within weldRelTol); for a binary file, distinct is then the
// number of distinct positions.
func (rd *stlReader) weld(workers int) *Mesh {
	var m *Mesh
	if rd.keys != nil {
		pos, starts := distinctPositions(rd.keys, rd.first, rd.scale, workers)
		rd.distinct = len(pos)
		m = weldPositions(rd.first, pos, starts, 0, weldRelTol, workers)
	} else {
		m = weld(rd.corners, 0, weldRelTol, workers)
	}
	return m
}

// cornerCount is the number of corners read.
func (rd *stlReader) cornerCount() int {
	if rd.keys != nil {
		return len(rd.keys)
	}
	return len(rd.corners)
}

// corner is corner i in mm.
func (rd *stlReader) corner(i int) mgl64.Vec3 {
	if rd.keys != nil {
		return rd.keys[i].position(rd.scale)
	}
	return rd.corners[i]
}

// dropDegenerate drops the degenerate triangles of a welded mesh and the vertices only they
// used, and says how many triangles went. degenerate, when not nil, already says which
// triangles isDegenerate finds degenerate.
func dropDegenerate(m *Mesh, degenerate []bool, workers int) (*Mesh, int) {
	nt := len(m.Triangles)
	if degenerate == nil {
		degenerate = make([]bool, nt)
		parallel.For(workers, (nt+triangleStretch-1)/triangleStretch, func(_, st int) {
			for t := st * triangleStretch; t < min(nt, (st+1)*triangleStretch); t++ {
				degenerate[t] = isDegenerate(m, t)
			}
		})
	}
	removed := countTrue(degenerate)
	if removed > 0 {
		keep := make([]int32, 0, nt-removed)
		for t, d := range degenerate {
			if !d {
				keep = append(keep, int32(t))
			}
		}
		m = m.Subset(keep)
	}
	return m, removed
}

// triangleStretch is how many triangles one goroutine takes at a time in a per-triangle pass.
const triangleStretch = 1 << 15

// loadNotes states what reading found beyond the surface's shape, each with a way to fix it.
func loadNotes(m *Mesh, rep LoadReport) []string {
	var w []string
	if rep.Turned > 0 {
		w = append(w, fmt.Sprintf("%d triangles faced the other way from their neighbours (or the surface was inside out) "+
			"and were turned over; nothing to fix unless other programs show the surface wrongly", rep.Turned))
	}
	if rep.DegenerateRemoved > 0 {
		w = append(w, fmt.Sprintf("%d triangles with zero area or a repeated corner were removed; "+
			"nothing to fix unless the surface now shows holes", rep.DegenerateRemoved))
	}
	lo, hi := m.Bounds()
	switch diag := hi.Sub(lo).Len(); {
	case diag > micrometreDiagonal:
		w = append(w, fmt.Sprintf("the model is %.0f units across, far larger than a tooth in millimetres: "+
			"the coordinates look like micrometres. Load it again with --scale 0.001", diag))
	case diag < metreDiagonal:
		w = append(w, fmt.Sprintf("the model is only %.3g units across, smaller than a canal in millimetres: "+
			"the coordinates may be in centimetres or metres. Load it again with --scale 10 or --scale 1000", diag))
	}
	if rep.TrianglesRead > largeMeshTriangles {
		w = append(w, fmt.Sprintf("the mesh has %d triangles; the analysis will be slow and need much memory. "+
			"Export the surface at a coarser resolution or decimate it if it is too slow", rep.TrianglesRead))
	}
	return w
}

// looksASCII decides the format from the first (up to 2048) bytes: ASCII starts with "solid"
// in any case and is plain text. A binary header may also start with "solid" (many exporters
// write that), but its count and records hold control bytes, so it goes to the binary reader,
// which then insists on a length of exactly 84 + 50n.
func looksASCII(head []byte) bool {
	i := 0
	if bytes.HasPrefix(head, []byte("\xEF\xBB\xBF")) {
		i = 3
	}
	for i < len(head) && stlSpace(head[i]) {
		i++
	}
	if len(head)-i < 5 || !bytes.EqualFold(head[i:i+5], []byte("solid")) || (i+5 < len(head) && !stlSpace(head[i+5])) {
		return false
	}
	for _, c := range head {
		if c < 0x20 && !stlSpace(c) || c == 0x7F {
			return false
		}
	}
	return true
}

func stlSpace(c byte) bool {
	return c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '\f' || c == '\v'
}

// stlReader collects the corners of an STL file, scaled to float64.
type stlReader struct {
	ctx      context.Context
	name     string
	scale    float64
	r        io.Reader
	size     int64
	progress func(int64, int64)
	workers  int
	binary   bool
	// corners are an ASCII file's corners; a binary file's are keys (and first, the first
	// corner of each one's position), unless its scale was too small for them.
	corners []mgl64.Vec3
	keys    []corner32
	first   []int32
	// distinct is the number of distinct positions among keys, once welded.
	distinct int
	// boxed says lo and hi bound every corner (the binary reader finds them as it decodes).
	boxed  bool
	lo, hi mgl64.Vec3
	// lines[t] is the line where ASCII facet t starts (nil for binary files).
	lines []int32
	// What an ASCII read skipped, as "line N: what" (the first few) and how many in all.
	problems     []string
	skipped      int // facets that could not be read
	strayRuns    int // runs of text between facets
	solids       int
	unterminated bool
}

const maxProblemsKept = 3

// where names triangle t (from 0) by its place in the file: the record's byte or the facet's line.
func (rd *stlReader) where(t int) string {
	if rd.binary {
		return fmt.Sprintf("triangle %d (byte %d)", t+1, stlHeaderSize+stlRecordSize*int64(t))
	}
	if t < len(rd.lines) {
		return fmt.Sprintf("triangle %d (line %d)", t+1, rd.lines[t])
	}
	return fmt.Sprintf("triangle %d", t+1)
}

func (rd *stlReader) notFinite(t int) error {
	return fmt.Errorf("%s: %s has a coordinate that is not a finite number (NaN or infinity); "+
		"repair or re-export the file", rd.name, rd.where(t))
}

func (rd *stlReader) stopped() error {
	if err := rd.ctx.Err(); err != nil {
		return fmt.Errorf("%s: loading stopped: %w", rd.name, err)
	}
	return nil
}

// stlBinaryChunk is how many records are decoded from one read: large enough that the reads
// cost nothing, small enough to stay in cache.
const stlBinaryChunk = 4096

// readBinary checks the length against the header's count before reading anything, so a
// hostile count can never make us allocate, then decodes the records straight from read
// buffers, chunks on several cores when the input can be read at an offset (a file).
func (rd *stlReader) readBinary(head []byte) error {
	name, size := rd.name, rd.size
	if size < stlHeaderSize {
		return fmt.Errorf("%s: not an STL file: it does not start with \"solid\" (ASCII) and at %d bytes "+
			"it is shorter than the %d-byte header of a binary STL", name, size, stlHeaderSize)
	}
	n := int64(binary.LittleEndian.Uint32(head[80:84]))
	if want := stlHeaderSize + stlRecordSize*n; want != size {
		var what string
		if want > size {
			what = "truncated"
		} else {
			what = "longer than its header says"
		}
		return fmt.Errorf("%s: binary STL header (bytes 80-83) says %d triangles, which need %d bytes, "+
			"but the file has %d bytes (%s, or not an STL file)", name, n, want, size, what)
	}
	if n > MaxTriangles {
		return fmt.Errorf("%s: %d triangles, more than the %d a surface may have here; "+
			"export the surface at a coarser resolution", name, n, MaxTriangles)
	}
	rd.binary = true
	rd.keys = make([]corner32, 3*n)
	chunks := int((n + stlBinaryChunk - 1) / stlBinaryChunk)
	// The identical corners are grouped by hash as each chunk is decoded (see cornerGroups),
	// unless a tiny scale could make distinct float32 values equal (then they are welded as
	// float64, the ASCII reader's way).
	var groups *cornerGroups
	if rd.scale >= minInjectiveScale {
		groups = newCornerGroups(rd.keys, 3*stlBinaryChunk)
	}
	// Only the plain readers are read at offsets: a wrapper's Read may do more than read.
	var ra io.ReaderAt
	switch r := rd.r.(type) {
	case *os.File:
		ra = r
	case *bytes.Reader:
		ra = r
	}
	k := 1
	if ra != nil {
		k = parallel.Workers(rd.workers, chunks)
	} else if _, err := io.ReadFull(rd.r, make([]byte, stlHeaderSize)); err != nil {
		return fmt.Errorf("%s: %w", name, err)
	}
	bufs := make([][]byte, k)
	boxes := make([][2][3]float32, chunks)
	// The first problem by place in the file wins, whatever the order chunks finish in.
	var mu sync.Mutex
	firstBad, firstErr := int64(-1), error(nil)
	fail := func(t int64, err error) {
		mu.Lock()
		if firstBad < 0 || t < firstBad {
			firstBad, firstErr = t, err
		}
		mu.Unlock()
	}
	// A chunk past a problem already found need not be read; one before it must be.
	pastFailure := func(t int64) bool {
		mu.Lock()
		defer mu.Unlock()
		return firstBad >= 0 && t > firstBad
	}
	var done atomic.Int64
	lastProg := int64(0)
	parallel.For(k, chunks, func(w, c int) {
		t0 := int64(c) * stlBinaryChunk
		if pastFailure(t0) {
			return
		}
		if err := rd.stopped(); err != nil {
			fail(t0, err)
			return
		}
		if bufs[w] == nil {
			bufs[w] = make([]byte, stlRecordSize*stlBinaryChunk)
		}
		m := min(stlBinaryChunk, n-t0)
		chunk := bufs[w][:m*stlRecordSize]
		var err error
		if ra != nil {
			_, err = ra.ReadAt(chunk, stlHeaderSize+t0*stlRecordSize)
		} else {
			_, err = io.ReadFull(rd.r, chunk)
		}
		if err != nil {
			if err == io.EOF || err == io.ErrUnexpectedEOF {
				err = fmt.Errorf("%s: the file ended at triangle %d of the %d its header announces (it shrank while being read)", name, t0+1, n)
			} else {
				err = fmt.Errorf("%s: %w", name, err)
			}
			fail(t0, err)
			return
		}
		if bad, ok := decodeBinaryChunk(chunk, rd.keys[3*t0:3*(t0+m)], &boxes[c]); !ok {
			fail(t0+bad, rd.notFinite(int(t0+bad)))
			return
		}
		if groups != nil {
			groups.count(c)
		}
		if rd.progress != nil {
			pos := stlHeaderSize + done.Add(m*stlRecordSize)
			mu.Lock()
			if pos-lastProg >= 1<<20 {
				lastProg = pos
				rd.progress(pos, size)
			}
			mu.Unlock()
		}
	})
	if firstErr != nil {
		return firstErr
	}
	if chunks > 0 {
		lo, hi := boxes[0][0], boxes[0][1]
		for _, b := range boxes[1:] {
			for a := range 3 {
				lo[a] = min(lo[a], b[0][a])
				hi[a] = max(hi[a], b[1][a])
			}
		}
		// Scaling by a positive number keeps the order, so the scaled bounds bound the
		// scaled corners.
		for a := range 3 {
			rd.lo[a] = float64(lo[a]) * rd.scale
			rd.hi[a] = float64(hi[a]) * rd.scale
		}
		rd.boxed = true
		if !finiteVec(rd.lo) || !finiteVec(rd.hi) {
			// Finite float32 times a large scale can overflow.
			for i := range rd.keys {
				if !finiteVec(rd.keys[i].position(rd.scale)) {
					return fmt.Errorf("%s: %s: a coordinate times the scale %g is too large to hold", name, rd.where(i/3), rd.scale)
				}
			}
		}
	}
	if groups != nil {
		rd.first = groups.first(rd.workers)
	} else {
		rd.corners = make([]mgl64.Vec3, len(rd.keys))
		for i := range rd.keys {
			rd.corners[i] = rd.keys[i].position(rd.scale)
		}
		rd.keys = nil
	}
	if rd.progress != nil {
		rd.progress(size, size)
	}
	return nil
}

// decodeBinaryChunk copies the corners' coordinate bits out of the records and their bounds
// into box. It stops at the first record with a coordinate that is not finite and returns
// its place in the chunk.
func decodeBinaryChunk(chunk []byte, out []corner32, box *[2][3]float32) (int64, bool) {
	inf := float32(math.Inf(1))
	lo := [3]float32{inf, inf, inf}
	hi := [3]float32{-inf, -inf, -inf}
	for i := range int64(len(out) / 3) {
		rec := chunk[i*stlRecordSize+12 : i*stlRecordSize+48]
		bad := uint32(0)
		for c := range 3 {
			var k corner32
			for a := range 3 {
				bits := binary.LittleEndian.Uint32(rec[12*c+4*a:])
				// An exponent of all ones (an infinity or a NaN) carries into the top bit.
				bad |= (bits&0x7F800000 + 0x00800000) & 0x80000000
				k[a] = bits
				v := math.Float32frombits(bits)
				lo[a] = min(lo[a], v)
				hi[a] = max(hi[a], v)
			}
			out[3*i+int64(c)] = k
		}
		if bad != 0 {
			return i, false
		}
	}
	*box = [2][3]float32{lo, hi}
	return 0, true
}
