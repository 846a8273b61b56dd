package mesh

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/go-gl/mathgl/mgl64"
)

// ASCII STL is a list of solids, each "solid NAME" ... "endsolid NAME", holding facets
// "facet normal nx ny nz / outer loop / vertex x y z (three times) / endloop / endfacet".
// Keywords are read in any case. Every solid is read. A facet that breaks the pattern is
// skipped, and so is text between facets; both are reported with their line numbers.

// asciiLexer splits the text into words, counting lines. A word longer than maxWord is cut
// (it is garbage anyway), so no line, however long, makes it allocate.
type asciiLexer struct {
	r        *bufio.Reader
	line     int // line of the last byte read (from 1)
	word     []byte
	wordLine int   // line where the word starts
	read     int64 // bytes consumed
	back     bool  // the last word is to be read again
	err      error // io.EOF at the end
}

const maxWord = 64

func (l *asciiLexer) readByte() (byte, bool) {
	c, err := l.r.ReadByte()
	if err != nil {
		l.err = err
		return 0, false
	}
	l.read++
	if c == '\n' {
		l.line++
	}
	return c, true
}

// next reads the next word; false at the end of the text (or a read error, in l.err).
func (l *asciiLexer) next() bool {
	if l.back {
		l.back = false
		return true
	}
	var c byte
	var ok bool
	for {
		if c, ok = l.readByte(); !ok {
			return false
		}
		if !stlSpace(c) {
			break
		}
	}
	l.wordLine = l.line
	l.word = append(l.word[:0], c)
	for {
		if c, ok = l.readByte(); !ok {
			return true
		}
		if stlSpace(c) {
			if c == '\n' {
				l.line-- // the newline belongs after the word; counted again when skipped
				l.r.UnreadByte()
				l.read--
			}
			return true
		}
		if len(l.word) < maxWord {
			l.word = append(l.word, c)
		}
	}
}

// restOfLine skips to the end of the current line (a solid's name).
func (l *asciiLexer) restOfLine() {
	for {
		c, ok := l.readByte()
		if !ok || c == '\n' {
			return
		}
	}
}

func (l *asciiLexer) is(keyword string) bool { return bytes.EqualFold(l.word, []byte(keyword)) }

// shown is the word as a message may quote it.
func (l *asciiLexer) shown() string {
	w := string(l.word)
	if len(l.word) >= maxWord {
		w += "..."
	}
	return strconv.QuoteToASCII(w)
}

// readASCII reads every solid of an ASCII STL.
func (rd *stlReader) readASCII() error {
	lx := &asciiLexer{r: bufio.NewReaderSize(rd.r, 1<<16), line: 1}
	if bom, err := lx.r.Peek(3); err == nil && bytes.Equal(bom, []byte("\xEF\xBB\xBF")) {
		lx.r.Discard(3)
		lx.read = 3
	}
	inSolid := false
	lastProg := int64(0)
	strayFrom := 0 // first line of a run of text between facets, 0 when none is open
	endStray := func(to int) {
		if strayFrom == 0 {
			return
		}
		rd.strayRuns++
		where := fmt.Sprintf("line %d", strayFrom)
		if to > strayFrom {
			where = fmt.Sprintf("lines %d-%d", strayFrom, to)
		}
		rd.problem(where + ": text between facets that is not a facet was skipped")
		strayFrom = 0
	}
	for n := 0; lx.next(); n++ {
		if n&1023 == 0 {
			if err := rd.stopped(); err != nil {
				return err
			}
			if rd.progress != nil && lx.read-lastProg >= 1<<20 {
				lastProg = lx.read
				rd.progress(lx.read, rd.size)
			}
		}
		switch {
		case lx.is("facet"):
			endStray(lx.wordLine - 1)
			if err := rd.asciiFacet(lx); err != nil {
				return err
			}
		case lx.is("solid"):
			endStray(lx.wordLine - 1)
			if inSolid {
				rd.unterminated = true
			}
			inSolid = true
			rd.solids++
			lx.restOfLine()
		case lx.is("endsolid"):
			endStray(lx.wordLine - 1)
			inSolid = false
			lx.restOfLine()
		default:
			if strayFrom == 0 {
				strayFrom = lx.wordLine
			}
			lx.restOfLine()
		}
	}
	endStray(lx.line)
	if lx.err != nil && lx.err != io.EOF {
		return fmt.Errorf("%s: line %d: %w", rd.name, lx.line, lx.err)
	}
	if inSolid {
		rd.unterminated = true
	}
	return nil
}

func (rd *stlReader) problem(msg string) {
	if len(rd.problems) < maxProblemsKept {
		rd.problems = append(rd.problems, msg)
	}
}

// asciiFacet reads one facet after its "facet" keyword. A facet that breaks the pattern is
// skipped (up to its endfacet, or to the next keyword that starts something else).
func (rd *stlReader) asciiFacet(lx *asciiLexer) error {
	start := lx.wordLine
	fail := func(format string, a ...any) {
		rd.skipped++
		rd.problem(fmt.Sprintf("line %d: facet skipped: %s", lx.wordLine, fmt.Sprintf(format, a...)))
		// Resynchronise: up to this facet's end, or the start of the next one.
		for lx.next() {
			switch {
			case lx.is("endfacet"):
				return
			case lx.is("facet"), lx.is("solid"), lx.is("endsolid"):
				lx.back = true
				return
			}
		}
	}
	expect := func(kw string) bool {
		if !lx.next() {
			fail("the file ends inside the facet that starts on line %d", start)
			return false
		}
		if !lx.is(kw) {
			fail("%q expected, found %s", kw, lx.shown())
			return false
		}
		return true
	}
	var nums [3]float64
	number3 := func(what string) bool {
		for a := range 3 {
			if !lx.next() {
				fail("the file ends inside the facet that starts on line %d", start)
				return false
			}
			// Coordinates are float32 in either STL flavour; reading them so keeps an ASCII
			// file and its binary twin identical.
			v, err := strconv.ParseFloat(string(lx.word), 32)
			if err != nil && !isRangeError(err) {
				fail("%s: %s is not a number", what, lx.shown())
				return false
			}
			nums[a] = v
		}
		return true
	}
	if !expect("normal") || !number3("normal") || !expect("outer") || !expect("loop") {
		return nil
	}
	var tri [3]mgl64.Vec3
	for c := range 3 {
		if !expect("vertex") || !number3("vertex") {
			return nil
		}
		tri[c] = mgl64.Vec3{nums[0], nums[1], nums[2]}
	}
	if !expect("endloop") || !expect("endfacet") {
		return nil
	}
	t := len(rd.corners) / 3
	if t >= MaxTriangles {
		return fmt.Errorf("%s: line %d: more than the %d triangles a surface may have here; "+
			"export the surface at a coarser resolution", rd.name, start, MaxTriangles)
	}
	rd.lines = append(rd.lines, int32(min(start, math.MaxInt32)))
	for c := range 3 {
		v := tri[c].Mul(rd.scale)
		if !finiteVec(tri[c]) || math.Abs(tri[c][0]) > math.MaxFloat32 || math.Abs(tri[c][1]) > math.MaxFloat32 ||
			math.Abs(tri[c][2]) > math.MaxFloat32 {
			return rd.notFinite(t)
		}
		if !finiteVec(v) {
			return fmt.Errorf("%s: %s: a coordinate times the scale %g is too large to hold", rd.name, rd.where(t), rd.scale)
		}
		rd.corners = append(rd.corners, v)
	}
	return nil
}

func isRangeError(err error) bool {
	ne, ok := err.(*strconv.NumError)
	return ok && ne.Err == strconv.ErrRange
}

// notes states what an ASCII read skipped or found unusual.
func (rd *stlReader) notes() []string {
	var w []string
	if rd.skipped > 0 || rd.strayRuns > 0 {
		var what []string
		if rd.skipped > 0 {
			what = append(what, fmt.Sprintf("%d facets that could not be read were skipped", rd.skipped))
		}
		if rd.strayRuns > 0 {
			what = append(what, fmt.Sprintf("%d runs of text between facets were skipped", rd.strayRuns))
		}
		msg := strings.Join(what, " and ") + " (" + strings.Join(rd.problems, "; ")
		if more := rd.skipped + rd.strayRuns - len(rd.problems); more > 0 {
			msg += fmt.Sprintf("; and %d more", more)
		}
		w = append(w, msg+"). The surface may have holes where they were; repair or re-export the file")
	}
	if rd.solids > 1 {
		w = append(w, fmt.Sprintf("the file holds %d solids (solid ... endsolid); the triangles of all of them were read", rd.solids))
	}
	if rd.unterminated {
		w = append(w, "a solid has no endsolid line; the file may have been cut short or joined from pieces")
	}
	return w
}

// checkOutliers refuses a surface with a corner far from all the rest (a corrupt vertex): it
// would stretch the weld tolerance, the units check and every measure. "Far" is four times
// the extent of the central 99 % of the corners beyond it, per axis, estimated from an even
// sample so it costs one pass.
func (rd *stlReader) checkOutliers() error {
	n := rd.cornerCount()
	if n < 64 {
		return nil
	}
	step := max(1, n/30000)
	var samples [3][]float64
	for a := range samples {
		samples[a] = make([]float64, 0, n/step+1)
	}
	for i := 0; i < n; i += step {
		c := rd.corner(i)
		for a := range 3 {
			samples[a] = append(samples[a], c[a])
		}
	}
	var lo, hi mgl64.Vec3
	for a, sample := range samples {
		slices.Sort(sample)
		k := len(sample) / 200
		lo[a], hi[a] = sample[k], sample[len(sample)-1-k]
	}
	extent := max(hi[0]-lo[0], hi[1]-lo[1], hi[2]-lo[2])
	var minV, maxV mgl64.Vec3
	for a := range 3 {
		minV[a], maxV[a] = lo[a]-4*extent, hi[a]+4*extent
	}
	if rd.boxed && rd.lo[0] >= minV[0] && rd.lo[1] >= minV[1] && rd.lo[2] >= minV[2] &&
		rd.hi[0] <= maxV[0] && rd.hi[1] <= maxV[1] && rd.hi[2] <= maxV[2] {
		return nil // every corner is inside: no need to look at each
	}
	first, count := -1, 0
	for i := range n {
		c := rd.corner(i)
		if c[0] < minV[0] || c[0] > maxV[0] || c[1] < minV[1] || c[1] > maxV[1] || c[2] < minV[2] || c[2] > maxV[2] {
			if first < 0 {
				first = i
			}
			count++
		}
	}
	if first < 0 {
		return nil
	}
	c := rd.corner(first)
	place := rd.where(first / 3)
	if rd.binary {
		place = fmt.Sprintf("triangle %d, corner %d (byte %d)", first/3+1, first%3+1,
			stlHeaderSize+stlRecordSize*int64(first/3)+12+12*int64(first%3))
	}
	others := ""
	if count > 1 {
		others = fmt.Sprintf(" (%d corners in all lie that far out)", count)
	}
	return fmt.Errorf("%s: %s lies at (%.6g, %.6g, %.6g), far outside the rest of the surface, which lies "+
		"within x %.4g..%.4g, y %.4g..%.4g, z %.4g..%.4g%s: a corrupt vertex? Repair or re-export the file",
		rd.name, place, c[0], c[1], c[2], lo[0], hi[0], lo[1], hi[1], lo[2], hi[2], others)
}
