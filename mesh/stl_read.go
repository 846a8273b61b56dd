package mesh

import (
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"github.com/go-gl/mathgl/mgl64"
	"github.com/hschendel/stl"
)

// LoadOptions tune reading an STL surface.
type LoadOptions struct {
	// Scale multiplies every coordinate (0 means 1), e.g. 0.001 for a file in micrometres.
	Scale float64
	// Progress, if set, is called now and then with the bytes read so far and the total.
	Progress func(doneBytes, totalBytes int64)
}

// LoadReport tells what was read and what looked wrong.
type LoadReport struct {
	Format            string // "binary" or "ascii"
	TrianglesRead     int
	DegenerateRemoved int
	Vertices          int
	// Warnings are plain-language problems, each with a way to fix it: the surface's own
	// (Validate's) followed by Notes.
	Warnings []string
	// Notes are what reading found beyond the surface's shape: triangles removed, units that
	// look wrong, a very large mesh. A caller that validates the mesh itself uses only these.
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

// LoadFile reads a binary or ASCII STL file; see Load.
func LoadFile(ctx context.Context, path string, opt LoadOptions) (*Mesh, LoadReport, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, LoadReport{}, fmt.Errorf("%s: cannot open: %w", path, err)
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil {
		return nil, LoadReport{}, fmt.Errorf("%s: %w", path, err)
	}
	if st.IsDir() {
		return nil, LoadReport{}, fmt.Errorf("%s: is a folder, not an STL file", path)
	}
	return Load(ctx, path, f, st.Size(), opt)
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
	head := make([]byte, min(size, 2048))
	if _, err := r.Seek(0, io.SeekStart); err != nil {
		return nil, rep, fmt.Errorf("%s: %w", name, err)
	}
	if _, err := io.ReadFull(r, head); err != nil {
		return nil, rep, fmt.Errorf("%s: cannot read the start of the file: %w", name, err)
	}

	col := &cornerCollector{name: name, scale: scale}
	var err error
	if asciiStart, lines, ok := looksASCII(head, size); ok {
		rep.Format = "ascii"
		err = readASCII(ctx, name, r, size, head, asciiStart, lines, col, opt.Progress)
	} else {
		rep.Format = "binary"
		err = readBinary(ctx, name, r, size, head, col, opt.Progress)
	}
	if err != nil {
		return nil, rep, err
	}
	rep.TrianglesRead = len(col.corners) / 3
	if rep.TrianglesRead == 0 {
		return nil, rep, fmt.Errorf("%s: the file holds no triangles", name)
	}
	if err := ctx.Err(); err != nil {
		return nil, rep, fmt.Errorf("%s: loading stopped: %w", name, err)
	}
	m, removed := weldAndClean(col.corners)
	rep.DegenerateRemoved = removed
	if len(m.Triangles) == 0 {
		return nil, rep, fmt.Errorf("%s: all %d triangles have zero area or a repeated corner", name, rep.TrianglesRead)
	}
	rep.Vertices = len(m.Vertices)
	if err := ctx.Err(); err != nil {
		return nil, rep, fmt.Errorf("%s: loading stopped: %w", name, err)
	}
	rep.Notes = loadNotes(m, rep)
	rep.Warnings = append(validate(m, false).Warnings(), rep.Notes...) // degenerate triangles are gone already
	return m, rep, nil
}

// weldAndClean welds the soup, drops degenerate triangles and the vertices only they used.
func weldAndClean(corners []mgl64.Vec3) (*Mesh, int) {
	m := weld(corners, 0, weldRelTol)
	keep := make([]int32, 0, len(m.Triangles))
	for t := range m.Triangles {
		if !isDegenerate(m, t) {
			keep = append(keep, int32(t))
		}
	}
	removed := len(m.Triangles) - len(keep)
	if removed > 0 {
		m = m.Subset(keep)
	}
	return m, removed
}

// loadNotes states what reading found beyond the surface's shape, each with a way to fix it.
func loadNotes(m *Mesh, rep LoadReport) []string {
	var w []string
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
// and is plain text. A binary header may also start with "solid" (many exporters write that),
// but its count and records hold control bytes, so it goes to the binary reader, which then
// insists on a length of exactly 84 + 50n. (The stl package decides by length alone; a text
// header can only match for a count of 538 million or more.) It returns where "solid" starts
// and how many lines come before it.
func looksASCII(head []byte, size int64) (start, lines int, ok bool) {
	i := 0
	if bytes.HasPrefix(head, []byte("\xEF\xBB\xBF")) {
		i = 3
	}
	for i < len(head) && stlSpace(head[i]) {
		if head[i] == '\n' {
			lines++
		}
		i++
	}
	if !bytes.HasPrefix(head[i:], []byte("solid")) || (i+5 < len(head) && !stlSpace(head[i+5])) {
		return 0, 0, false
	}
	// A binary header may start with "solid" too, but its count and records hold control bytes.
	for _, c := range head {
		if c < 0x20 && !stlSpace(c) || c == 0x7F {
			return 0, 0, false
		}
	}
	return i, lines, true
}

func stlSpace(c byte) bool {
	return c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '\f' || c == '\v'
}

func binarySizeMatches(head []byte, size int64) bool {
	n := int64(binary.LittleEndian.Uint32(head[80:84]))
	return stlHeaderSize+stlRecordSize*n == size
}

// readBinary checks the length against the header's count before reading anything, so a
// hostile count can never make us allocate, then reads the records through the stl package.
func readBinary(ctx context.Context, name string, r io.ReadSeeker, size int64, head []byte, col *cornerCollector, progress func(int64, int64)) error {
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
	col.binary = true
	col.corners = make([]mgl64.Vec3, 0, 3*n)
	s := newSTLStream(ctx, r, 0, size, nil, nil, progress, col)
	if err := stl.CopyAll(s, col); err != nil {
		if e := s.stopErr(); e != nil {
			return e
		}
		return fmt.Errorf("%s: %w", name, err)
	}
	if e := s.stopErr(); e != nil {
		return e
	}
	if len(col.corners) != int(3*n) {
		return fmt.Errorf("%s: read %d of the %d triangles the header announces", name, len(col.corners)/3, n)
	}
	s.finish()
	return nil
}

// readASCII hands the text to the stl package. Its parser wants "solid " (with a space) at the
// very start and decides binary-or-ASCII by length alone, so the stream it sees starts at
// "solid ", skipping any byte-order mark or leading blank lines, and ends with one or two extra
// newlines that keep its length from matching 84 + 50n.
func readASCII(ctx context.Context, name string, r io.ReadSeeker, size int64, head []byte, start, lines int, col *cornerCollector, progress func(int64, int64)) error {
	prefix := []byte("solid ")
	bodyOff := int64(start + 5)
	virtual := append(append([]byte{}, prefix...), head[min(int64(len(head)), bodyOff):]...)
	vsize := int64(len(prefix)) + size - bodyOff
	suffix := []byte("\n")
	if len(virtual) >= stlHeaderSize && binarySizeMatches(virtual, vsize+1) {
		suffix = []byte("\n\n")
	}
	s := newSTLStream(ctx, r, bodyOff, size, prefix, suffix, progress, col)
	err := stl.CopyAll(s, col)
	if e := s.stopErr(); e != nil {
		return e
	}
	if err != nil {
		return asciiError(name, err, lines)
	}
	s.finish()
	return nil
}

// asciiError turns the parser's "line: message" list into one message naming the first place.
func asciiError(name string, err error, lineOffset int) error {
	var first string
	more := 0
	for _, l := range strings.Split(err.Error(), "\n") {
		num, msg, ok := strings.Cut(l, ": ")
		if !ok {
			continue
		}
		n, perr := strconv.Atoi(num)
		if perr != nil {
			continue
		}
		if first == "" {
			if msg != "" && msg[0] >= 'A' && msg[0] <= 'Z' {
				msg = string(msg[0]+'a'-'A') + msg[1:]
			}
			first = fmt.Sprintf("line %d: %s", n+lineOffset, msg)
		} else {
			more++
		}
	}
	if first == "" {
		return fmt.Errorf("%s: ASCII STL: %s", name, strings.TrimSpace(err.Error()))
	}
	if more > 0 {
		return fmt.Errorf("%s: ASCII STL %s (and %d more problems)", name, first, more)
	}
	return fmt.Errorf("%s: ASCII STL %s", name, first)
}

// cornerCollector receives triangles from the stl package and keeps their corners, scaled
// to float64. It ignores the header's triangle count on purpose: the length check decides
// what to allocate.
type cornerCollector struct {
	name    string
	scale   float64
	binary  bool
	corners []mgl64.Vec3
	stop    error // set on the first bad triangle; the stream then ends the read
}

func (c *cornerCollector) SetName(string)         {}
func (c *cornerCollector) SetBinaryHeader([]byte) {}
func (c *cornerCollector) SetASCII(bool)          {}
func (c *cornerCollector) SetTriangleCount(uint32) {
}

func (c *cornerCollector) AppendTriangle(t stl.Triangle) {
	if c.stop != nil {
		return
	}
	for _, v := range t.Vertices {
		for _, x := range v {
			if x != x || x > math.MaxFloat32 || x < -math.MaxFloat32 {
				c.stop = c.badTriangle(len(c.corners)/3 + 1)
				return
			}
		}
	}
	s := c.scale
	for _, v := range t.Vertices {
		c.corners = append(c.corners, mgl64.Vec3{float64(v[0]) * s, float64(v[1]) * s, float64(v[2]) * s})
	}
}

func (c *cornerCollector) badTriangle(num int) error {
	where := fmt.Sprintf("triangle %d", num)
	if c.binary {
		where += fmt.Sprintf(" (byte %d)", stlHeaderSize+stlRecordSize*int64(num-1))
	}
	return fmt.Errorf("%s: %s has a coordinate that is not a finite number (NaN or infinity); "+
		"repair or re-export the file", c.name, where)
}

// errStopped marks a read we ended ourselves; the real cause is in stlStream.stopErr.
var errStopped = errors.New("read stopped")

// stlStream is the io.ReadSeeker the stl package reads: prefix + r[off:size] + suffix. It
// counts bytes for progress and ends the read early when ctx is cancelled or the collector
// found a bad triangle.
type stlStream struct {
	ctx      context.Context
	r        io.ReadSeeker
	off, end int64 // body range in r
	prefix   []byte
	suffix   []byte
	pos      int64 // position in the virtual stream
	rpos     int64 // r's own position, -1 if unknown
	progress func(int64, int64)
	lastProg int64
	col      *cornerCollector
	ctxErr   error
}

func newSTLStream(ctx context.Context, r io.ReadSeeker, off, end int64, prefix, suffix []byte, progress func(int64, int64), col *cornerCollector) *stlStream {
	return &stlStream{ctx: ctx, r: r, off: off, end: end, prefix: prefix, suffix: suffix, rpos: -1, progress: progress, col: col}
}

func (s *stlStream) size() int64 {
	return int64(len(s.prefix)) + (s.end - s.off) + int64(len(s.suffix))
}

func (s *stlStream) stopErr() error {
	if s.ctxErr != nil {
		return fmt.Errorf("%s: loading stopped: %w", s.col.name, s.ctxErr)
	}
	return s.col.stop
}

// finish reports the whole file as read.
func (s *stlStream) finish() {
	if s.progress != nil {
		s.progress(s.end, s.end)
	}
}

func (s *stlStream) Seek(offset int64, whence int) (int64, error) {
	switch whence {
	case io.SeekStart:
	case io.SeekCurrent:
		offset += s.pos
	case io.SeekEnd:
		offset += s.size()
	default:
		return s.pos, errors.New("bad whence")
	}
	if offset < 0 {
		return s.pos, errors.New("negative position")
	}
	s.pos = offset
	return offset, nil
}

// Read fills p across the parts, so the stl package's single header read sees real bytes.
func (s *stlStream) Read(p []byte) (int, error) {
	total := 0
	for total < len(p) {
		n, err := s.readPart(p[total:])
		total += n
		if err == io.EOF && total > 0 {
			return total, nil
		}
		if err != nil {
			return total, err
		}
		if n == 0 {
			break
		}
	}
	return total, nil
}

func (s *stlStream) readPart(p []byte) (int, error) {
	if s.col.stop != nil {
		return 0, errStopped
	}
	if err := s.ctx.Err(); err != nil {
		s.ctxErr = err
		return 0, errStopped
	}
	np := int64(len(s.prefix))
	body := s.end - s.off
	switch {
	case s.pos < np:
		n := copy(p, s.prefix[s.pos:])
		s.pos += int64(n)
		return n, nil
	case s.pos < np+body:
		at := s.off + s.pos - np
		if s.rpos != at {
			if _, err := s.r.Seek(at, io.SeekStart); err != nil {
				s.rpos = -1
				return 0, err
			}
		}
		want := min(int64(len(p)), np+body-s.pos)
		n, err := s.r.Read(p[:want])
		s.pos += int64(n)
		s.rpos = at + int64(n)
		if err == io.EOF {
			if n > 0 {
				err = nil
			} else {
				err = io.ErrUnexpectedEOF // the file shrank under us
			}
		}
		if s.progress != nil && s.rpos-s.lastProg >= 1<<20 {
			s.lastProg = s.rpos
			s.progress(s.rpos, s.end)
		}
		return n, err
	default:
		i := s.pos - np - body
		if i >= int64(len(s.suffix)) {
			return 0, io.EOF
		}
		n := copy(p, s.suffix[i:])
		s.pos += int64(n)
		return n, nil
	}
}
