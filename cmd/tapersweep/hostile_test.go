package main

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"syscall"
	"testing"
	"unicode/utf16"

	"tapersweep/mesh"
	"tapersweep/models"
)

// The hostile list: inputs and conditions a careless or hostile world hands the program. Each
// must answer with exit 1 (2 for a usage mistake) and a message naming the file and the place,
// or with a correct result and a warning; never a panic, a hang or a silently wrong number.
// The normal test runs the list in-process. With -hostile.exec=BINARY (see .ci/hostile.sh)
// each case runs as its own process under a time limit with its peak memory measured, the big
// inputs near the size limits are added, and the kill -9 runs check that no output is ever lost
// or truncated.

var hostileExec = flag.String("hostile.exec", "", "run the hostile list against this tapersweep binary, with big inputs, peak memory and kill -9 runs")

// hostileCase is one entry of the list.
type hostileCase struct {
	name   string
	args   []string
	stdout string // a file to write standard output to ("/dev/full"); "" keeps it
	code   int
	say    []string // every one must be in stderr
	// sameLength, for a case that must give a correct result, is the canal whose
	// centerline length it must match (within 1 %), read from the JSON on stdout.
	sameLength bool
	big        bool // only with -hostile.exec
	// after checks files the case left (an input not overwritten, ...).
	after func(t *testing.T)
}

// hostileFixture writes the files the list uses into dir and returns the cases.
func hostileFixture(t *testing.T, dir string) []hostileCase {
	t.Helper()
	put := func(name string, data []byte) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, data, 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	stl := func(m *mesh.Mesh) []byte {
		var b bytes.Buffer
		if err := mesh.WriteSTL(&b, m, "demo hostile"); err != nil {
			t.Fatal(err)
		}
		return b.Bytes()
	}
	ascii := func(m *mesh.Mesh) string {
		var b bytes.Buffer
		if err := mesh.WriteASCIISTL(&b, m, "demo hostile"); err != nil {
			t.Fatal(err)
		}
		return b.String()
	}
	spec := models.ExampleCanals()[2].Spec
	clean := spec.Mesh(0.1, 40)
	cleanSTL := stl(clean)
	canal := put("canal.stl", cleanSTL)
	specJSON, err := models.ExampleCanals()[2].SpecJSON()
	if err != nil {
		t.Fatal(err)
	}
	canalJSON := put("canal.json", specJSON)
	seq := put("seq.json", []byte(testSequence))
	nt := len(clean.Triangles)
	rec := func(t int) int { return 84 + 50*t } // byte where triangle t (from 0) starts

	// Binary STL damage.
	patch := func(name string, at int, v float32) string {
		d := bytes.Clone(cleanSTL)
		binary.LittleEndian.PutUint32(d[at:], math.Float32bits(v))
		return put(name, d)
	}
	withMesh := func(name string, f func(m *mesh.Mesh) *mesh.Mesh) string {
		m := &mesh.Mesh{Vertices: append(clean.Vertices[:0:0], clean.Vertices...), Triangles: append(clean.Triangles[:0:0], clean.Triangles...)}
		return put(name, stl(f(m)))
	}
	// A hole of a few triangles halfway down, and a surface missing a quarter of its wall.
	half := withMesh("open.stl", func(m *mesh.Mesh) *mesh.Mesh {
		m.Triangles = append(m.Triangles[:nt/2], m.Triangles[nt/2+6:]...)
		return m
	})
	quarter := withMesh("quarter_gone.stl", func(m *mesh.Mesh) *mesh.Mesh {
		m.Triangles = m.Triangles[:nt*3/4]
		return m
	})
	rng := rand.New(rand.NewPCG(11, 12))
	mixed := withMesh("mixed.stl", func(m *mesh.Mesh) *mesh.Mesh {
		for i := range m.Triangles {
			if rng.IntN(10) < 4 {
				m.Triangles[i][1], m.Triangles[i][2] = m.Triangles[i][2], m.Triangles[i][1]
			}
		}
		return m
	})
	inside := withMesh("inside_out.stl", func(m *mesh.Mesh) *mesh.Mesh {
		for i := range m.Triangles {
			m.Triangles[i][1], m.Triangles[i][2] = m.Triangles[i][2], m.Triangles[i][1]
		}
		return m
	})
	scaled := func(name string, k float64) string {
		return withMesh(name, func(m *mesh.Mesh) *mesh.Mesh {
			for i := range m.Vertices {
				m.Vertices[i] = m.Vertices[i].Mul(k)
			}
			return m
		})
	}
	micro := scaled("micrometres.stl", 1000)
	metres := scaled("metres.stl", 0.001)
	flat := withMesh("all_degenerate.stl", func(m *mesh.Mesh) *mesh.Mesh {
		for i := range m.Triangles {
			m.Triangles[i] = [3]int32{m.Triangles[i][0], m.Triangles[i][0], m.Triangles[i][1]}
		}
		return m
	})
	mostlyFlat := withMesh("mostly_degenerate.stl", func(m *mesh.Mesh) *mesh.Mesh {
		for range 2 * nt {
			m.Triangles = append(m.Triangles, [3]int32{0, 0, 1})
		}
		return m
	})
	twoShells := withMesh("two_shells.stl", func(m *mesh.Mesh) *mesh.Mesh {
		n := int32(len(m.Vertices))
		for _, v := range clean.Vertices {
			m.Vertices = append(m.Vertices, v.Add([3]float64{6, 0, 0}))
		}
		for _, tr := range clean.Triangles {
			m.Triangles = append(m.Triangles, [3]int32{tr[0] + n, tr[1] + n, tr[2] + n})
		}
		return m
	})
	solidHead := bytes.Clone(cleanSTL)
	copy(solidHead, "solid but binary all the same")

	// ASCII STL damage.
	text := ascii(clean)
	facets := strings.SplitAfter(text, "endfacet\n")
	lineOf := func(s string) int { return strings.Count(s, "\n") + 1 }
	// facets[0] carries the "solid" line and the last piece the "endsolid" line.
	twoSolids := strings.Join(facets[:nt/2], "") + "endsolid a\nsolid b\n" + strings.Join(facets[nt/2:], "")
	misspelt := strings.Join(facets[:100], "") + strings.Replace(facets[100], "outer loop", "outer lop", 1) + strings.Join(facets[101:], "")
	misspeltLine := lineOf(strings.Join(facets[:100], "")) + 1
	noise := strings.Join(facets[:50], "") + "exported by hand\n" + strings.Join(facets[50:], "")
	noiseLine := lineOf(strings.Join(facets[:50], ""))
	badNumber := strings.Join(facets[:7], "") + strings.Replace(facets[7], "vertex ", "vertex zero ", 1) + strings.Join(facets[8:], "")
	asciiNaN := strings.Join(facets[:7], "") + regexp.MustCompile(`vertex \S+`).ReplaceAllString(facets[7], "vertex nan") + strings.Join(facets[8:], "")
	cut := text[:len(text)*2/3]
	longLine := strings.Join(facets[:10], "") + strings.Repeat("x", 1<<20) + "\n" + strings.Join(facets[10:], "")

	// Not STL, not a canal spec.
	utf16le := func(s string, bom bool) []byte {
		var b []byte
		if bom {
			b = []byte{0xFF, 0xFE}
		}
		for _, u := range utf16.Encode([]rune(s)) {
			b = binary.LittleEndian.AppendUint16(b, u)
		}
		return b
	}
	fifo := filepath.Join(dir, "pipe.stl")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	seqFifo := filepath.Join(dir, "pipe_seq.json")
	if err := syscall.Mkfifo(seqFifo, 0o644); err != nil {
		t.Fatal(err)
	}
	bigSpec := put("big_spec.json", append(bytes.Clone(specJSON[:len(specJSON)-2]), append(bytes.Repeat([]byte(" "), 5<<20), '}')...))

	out := filepath.Join(dir, "out")
	os.Mkdir(out, 0o755)
	canalBefore := bytes.Clone(cleanSTL)
	keepsCanal := func(t *testing.T) {
		if got, _ := os.ReadFile(canal); !bytes.Equal(got, canalBefore) {
			t.Errorf("canal.stl was changed")
		}
	}
	compare := put("compare.json", []byte(testSequence))
	manifestBad := put("manifest.csv", []byte("file,scale\ncanal.stl,zero\n"))
	foldered := filepath.Join(dir, "study")
	os.Mkdir(foldered, 0o755)
	os.WriteFile(filepath.Join(foldered, "a.stl"), cleanSTL, 0o644)
	os.WriteFile(filepath.Join(foldered, "plan.json"), []byte(testSequence), 0o644)

	cl := func(p string, more ...string) []string {
		return append([]string{"centerline", "--canal", p, "--format", "json"}, more...)
	}
	const fail, usage = exitBadInput, exitUsage
	cases := []hostileCase{
		{name: "empty file", args: cl(put("empty.stl", nil)), code: fail, say: []string{"empty.stl", "empty"}},
		{name: "40 bytes", args: cl(put("short.stl", cleanSTL[:40])), code: fail, say: []string{"short.stl", "40 bytes"}},
		{name: "truncated binary", args: cl(put("cut.stl", cleanSTL[:len(cleanSTL)-31])), code: fail, say: []string{"cut.stl", "bytes 80-83", "truncated"}},
		{name: "binary with extra bytes", args: cl(put("long.stl", append(bytes.Clone(cleanSTL), 1, 2, 3))), code: fail, say: []string{"long.stl", "longer than its header"}},
		{name: "hostile count", args: cl(put("count.stl", func() []byte {
			d := bytes.Clone(cleanSTL[:84+50])
			binary.LittleEndian.PutUint32(d[80:], math.MaxUint32)
			return d
		}())), code: fail, say: []string{"count.stl", "4294967295"}},
		{name: "NaN", args: cl(patch("nan.stl", rec(41)+16, float32(math.NaN()))), code: fail, say: []string{"nan.stl", "triangle 42 ", fmt.Sprintf("byte %d", rec(41))}},
		{name: "+Inf", args: cl(patch("inf.stl", rec(9)+40, float32(math.Inf(1)))), code: fail, say: []string{"inf.stl", "triangle 10 ", "not a finite number"}},
		{name: "-Inf", args: cl(patch("ninf.stl", rec(0)+12, float32(math.Inf(-1)))), code: fail, say: []string{"ninf.stl", "triangle 1 "}},
		{name: "vertex at 1e4", args: cl(patch("v1e4.stl", rec(99)+24, 1e4)), code: fail, say: []string{"v1e4.stl", "triangle 100, corner 2", fmt.Sprintf("byte %d", rec(99)+24), "far outside"}},
		{name: "vertex at 1e6", args: cl(patch("v1e6.stl", rec(99)+12, 1e6)), code: fail, say: []string{"v1e6.stl", "triangle 100, corner 1", "far outside"}},
		{name: "vertex at 3e38", args: cl(patch("v3e38.stl", rec(5)+44, 3e38)), code: fail, say: []string{"v3e38.stl", "triangle 6, corner 3", "far outside"}},
		{name: "vertex at -2e5", args: cl(patch("vneg.stl", rec(nt-1)+20, -2e5)), code: fail, say: []string{"vneg.stl", fmt.Sprintf("triangle %d", nt), "far outside"}},
		{name: "all triangles degenerate", args: cl(flat), code: fail, say: []string{"all_degenerate.stl", "zero area"}},
		{name: "most triangles degenerate", args: cl(mostlyFlat), code: fail, say: []string{"mostly_degenerate.stl", "were removed", "--force"}},
		{name: "binary header starting solid", args: cl(put("solid_head.stl", solidHead)), code: exitOK, sameLength: true},
		{name: "open surface", args: cl(half), code: fail, say: []string{"open.stl", "not closed", "edges border holes", "--force"}},
		{name: "open surface forced", args: cl(half, "--force"), code: exitOK, say: []string{"warning", "not closed"}},
		{name: "open surface, csv", args: []string{"centerline", "--canal", half, "--format", "csv"}, code: fail, say: []string{"open.stl", "not closed"}},
		{name: "open surface forced, csv", args: []string{"centerline", "--canal", half, "--format", "csv", "--force"}, code: exitOK, say: []string{"warning", "not closed"}},
		{name: "a quarter of the wall missing, forced", args: cl(quarter, "--force"), code: fail, say: []string{"quarter_gone.stl", "is the surface closed"}},
		{name: "mixed winding", args: cl(mixed), code: exitOK, sameLength: true, say: []string{"warning", "turned over"}},
		{name: "inside out", args: cl(inside), code: exitOK, sameLength: true, say: []string{"warning", "turned over"}},
		{name: "two shells", args: cl(twoShells), code: exitOK, say: []string{"warning", "2 separate surfaces", "--shell"}},
		{name: "two shells, one kept", args: cl(twoShells, "--shell", "2"), code: exitOK, sameLength: true, say: []string{"surface 2 of 2 kept"}},
		{name: "micrometres", args: cl(micro), code: fail, say: []string{"micrometres.stl", "--scale 0.001"}},
		{name: "micrometres scaled", args: cl(micro, "--scale", "0.001"), code: exitOK, sameLength: true},
		{name: "metres", args: cl(metres), code: fail, say: []string{"metres.stl", "--scale 1000"}},
		{name: "ascii upper case", args: cl(put("upper.stl", []byte(strings.ToUpper(text)))), code: exitOK, sameLength: true},
		{name: "ascii two solids", args: cl(put("two_solids.stl", []byte(twoSolids))), code: exitOK, sameLength: true, say: []string{"2 solids"}},
		{name: "ascii misspelt keyword", args: cl(put("misspelt.stl", []byte(misspelt))), code: fail, say: []string{"misspelt.stl", fmt.Sprintf("line %d", misspeltLine), "lop", "not closed"}},
		{name: "ascii noise between facets", args: cl(put("noise.stl", []byte(noise))), code: exitOK, sameLength: true, say: []string{fmt.Sprintf("line %d: text between facets", noiseLine)}},
		{name: "ascii bad number", args: cl(put("badnum.stl", []byte(badNumber))), code: fail, say: []string{"badnum.stl", "zero", "not a number", "line"}},
		{name: "ascii NaN", args: cl(put("asciinan.stl", []byte(asciiNaN))), code: fail, say: []string{"asciinan.stl", "triangle 8 (line", "not a finite number"}},
		{name: "ascii cut short", args: cl(put("asciicut.stl", []byte(cut))), code: fail, say: []string{"asciicut.stl", "not closed", "line"}},
		{name: "ascii without endsolid", args: cl(put("noend.stl", []byte(strings.TrimSuffix(text, "endsolid demo hostile\n")))), code: exitOK, sameLength: true, say: []string{"no endsolid"}},
		{name: "ascii crlf", args: cl(put("crlf.stl", []byte(strings.ReplaceAll(text, "\n", "\r\n")))), code: exitOK, sameLength: true},
		{name: "ascii bom", args: cl(put("bom.stl", []byte("\xEF\xBB\xBF"+text))), code: exitOK, sameLength: true},
		{name: "ascii 1 MB line", args: cl(put("longline.stl", []byte(longLine))), code: exitOK, sameLength: true, say: []string{"text between facets"}},
		{name: "ascii-looking binary", args: cl(put("asciibin.stl", append([]byte("solid x\n"), 0, 1, 2, 3))), code: fail, say: []string{"asciibin.stl", "not an STL file"}},
		{name: "plain text", args: cl(put("words.stl", []byte("these are words, not a surface, and there are enough of them to pass eighty-four bytes easily"))), code: fail, say: []string{"words.stl", "not an STL file"}},
		{name: "json null", args: cl(put("null.json", []byte("null\n"))), code: fail, say: []string{"null.json", "not a canal spec"}},
		{name: "json array", args: cl(put("array.json", []byte(`[{"kind": "straight"}]`))), code: fail, say: []string{"array.json", "not a canal spec"}},
		{name: "json string", args: cl(put("string.json", []byte(`"canal"`))), code: fail, say: []string{"string.json", "not a canal spec"}},
		{name: "json number", args: cl(put("number.json", []byte("42"))), code: fail, say: []string{"number.json", "not a canal spec"}},
		{name: "utf-16 with mark", args: cl(put("utf16.json", utf16le(string(specJSON), true))), code: fail, say: []string{"utf16.json", "UTF-16"}},
		{name: "utf-16 without mark", args: cl(put("utf16nobom.json", utf16le(string(specJSON), false))), code: fail, say: []string{"utf16nobom.json", "UTF-16"}},
		{name: "sequence as canal", args: cl(seq), code: fail, say: []string{"seq.json", "this is a sequence, not a canal"}},
		{name: "spec over 1 MB", args: cl(bigSpec), code: fail, say: []string{"big_spec.json", "more than a canal spec can need"}},
		{name: "spec broken json", args: cl(put("broken.json", []byte("{\"segments\": [\n{\"kind\": \"straight\",, }]}"))), code: fail, say: []string{"broken.json", "line 2"}},
		{name: "spec unknown field", args: cl(put("unknown.json", []byte(`{"segments":[{"kind":"straight","length":9}],"orifice_d":1,"apical_d":0.3,"colour":"red"}`))), code: fail, say: []string{"unknown.json", "colour"}},
		{name: "spec negative radius", args: cl(put("negr.json", []byte(`{"segments":[{"kind":"arc","radius":-2,"angle":30}],"orifice_d":1,"apical_d":0.3}`))), code: fail, say: []string{"negr.json", "segment 1", "radius"}},
		{name: "spec", args: cl(canalJSON), code: exitOK},
		{name: "canal /dev/zero", args: cl("/dev/zero"), code: fail, say: []string{"/dev/zero", "device"}},
		{name: "canal named pipe", args: cl(fifo), code: fail, say: []string{"pipe.stl", "named pipe"}},
		{name: "canal folder", args: cl(dir), code: fail, say: []string{dir, "folder"}},
		{name: "canal missing", args: cl(filepath.Join(dir, "none.stl")), code: fail, say: []string{"none.stl", "cannot open"}},
		{name: "sequence named pipe", args: []string{"analyze", "--canal", canal, "--sequence", seqFifo}, code: fail, say: []string{"pipe_seq.json", "named pipe"}},
		{name: "sequence /dev/zero", args: []string{"analyze", "--canal", canal, "--sequence", "/dev/zero"}, code: fail, say: []string{"/dev/zero", "device"}},
		{name: "render over its canal", args: []string{"render", "--canal", canal, "--out", canal}, code: fail, say: []string{"canal.stl", "would replace the input"}, after: keepsCanal},
		{name: "report over its sequence", args: []string{"report", "--canal", canal, "--sequence", seq, "--out", seq}, code: fail, say: []string{"seq.json", "would replace the input"}},
		{name: "plan over its comparison", args: []string{"plan", "--canal", canal, "--target", "25/.04", "--compare", compare, "--out", compare}, code: fail, say: []string{"compare.json", "would replace the input"}},
		{name: "report to /dev/full", args: []string{"report", "--canal", canal, "--sequence", seq, "--out", "/dev/full"}, code: fail, say: []string{"/dev/full", "device"}},
		{name: "render into a folder", args: []string{"render", "--canal", canal, "--out", out}, code: fail, say: []string{out, "folder"}},
		{name: "render into a missing folder", args: []string{"render", "--canal", canal, "--out", filepath.Join(dir, "no", "such", "x.png")}, code: fail, say: []string{"x.png"}},
		{name: "analyze table on a full disk", args: []string{"analyze", "--canal", canal, "--sequence", seq, "--format", "table"}, stdout: "/dev/full", code: fail, say: []string{"writing the output failed", "no space"}},
		{name: "analyze json on a full disk", args: []string{"analyze", "--canal", canal, "--sequence", seq}, stdout: "/dev/full", code: fail, say: []string{"no space left"}},
		{name: "centerline csv on a full disk", args: []string{"centerline", "--canal", canal, "--format", "csv"}, stdout: "/dev/full", code: fail, say: []string{"no space left"}},
		{name: "centerline json on a full disk", args: cl(canal), stdout: "/dev/full", code: fail, say: []string{"no space left"}},
		{name: "plan on a full disk", args: []string{"plan", "--canal", canal, "--target", "25/.04", "--max-steps", "2"}, stdout: "/dev/full", code: fail, say: []string{"writing the output failed", "no space"}},
		{name: "demo into a file", args: []string{"demo", "--out", seq}, code: fail, say: []string{"seq.json"}},
		{name: "surface on a full disk", args: []string{"surface", "--canal", canal}, stdout: "/dev/full", code: fail, say: []string{"no space left"}},
		{name: "batch to standard output on a full disk", args: []string{"batch", "--canals", foldered, "--sequence", seq, "--out", "-"}, stdout: "/dev/full", code: fail, say: []string{"no space"}},
		{name: "batch with a sequence among the canals", args: []string{"batch", "--canals", foldered, "--sequence", seq, "--out", filepath.Join(out, "b.csv")}, code: fail, say: []string{"plan.json", "this is a sequence, not a canal", "1 of 2 canals failed"}},
		{name: "batch manifest with a bad cell", args: []string{"batch", "--manifest", manifestBad, "--sequence", seq, "--out", filepath.Join(out, "m.csv")}, code: fail, say: []string{"manifest.csv", "line 2, column scale"}},
		{name: "orifice not a number", args: cl(canal, "--orifice", "NaN,0,0"), code: usage, say: []string{"--orifice"}},
		{name: "scale zero", args: cl(canal, "--scale", "0"), code: usage, say: []string{"--scale"}},
	}
	return cases
}

func TestHostileInputs(t *testing.T) {
	dir := t.TempDir()
	cases := hostileFixture(t, dir)
	if len(cases) < 60 {
		t.Fatalf("the hostile list has %d entries, want at least 60", len(cases))
	}
	ref := centerlineLength(t, hostileRun(t, hostileCase{args: []string{"centerline", "--canal", filepath.Join(dir, "canal.stl"), "--format", "json"}}))
	passed := 0
	for _, c := range cases {
		if c.big && *hostileExec == "" {
			continue
		}
		ok := t.Run(c.name, func(t *testing.T) {
			r := hostileRun(t, c)
			if r.code != c.code {
				t.Fatalf("exit %d, want %d; stderr:\n%s", r.code, c.code, r.stderr)
			}
			for _, s := range c.say {
				if !strings.Contains(strings.ToLower(r.stderr), strings.ToLower(s)) {
					t.Errorf("stderr does not say %q:\n%s", s, r.stderr)
				}
			}
			if strings.Contains(r.stderr, "panic") || strings.Contains(r.stderr, "goroutine ") {
				t.Errorf("a panic:\n%s", r.stderr)
			}
			if c.sameLength {
				if got := centerlineLength(t, r); math.Abs(got-ref) > 0.01*ref {
					t.Errorf("centerline %.3f mm, the clean file gives %.3f", got, ref)
				}
			}
			if c.after != nil {
				c.after(t)
			}
			if r.maxRSS > 0 {
				t.Logf("peak memory %.0f MB", float64(r.maxRSS)/(1<<20))
				if r.maxRSS > 4<<30 {
					t.Errorf("peak memory %.1f GB, over 4 GB", float64(r.maxRSS)/(1<<30))
				}
			}
		})
		if ok {
			passed++
		}
	}
	t.Logf("hostile list: %d of %d cases answered as they must", passed, len(cases))
}

type hostileResult struct {
	code           int
	stdout, stderr string
	maxRSS         int64 // bytes; 0 in-process
}

// hostileRun runs a case in-process, or as a process of the -hostile.exec binary.
func hostileRun(t *testing.T, c hostileCase) hostileResult {
	t.Helper()
	if *hostileExec != "" {
		return hostileRunProcess(t, c)
	}
	var errOut bytes.Buffer
	var outBuf bytes.Buffer
	var code int
	if c.stdout != "" {
		f, err := os.OpenFile(c.stdout, os.O_WRONLY|os.O_TRUNC|os.O_CREATE, 0o644)
		if err != nil {
			t.Skipf("%s: %v", c.stdout, err)
		}
		code = run(c.args, f, &errOut)
		f.Close()
	} else {
		code = run(c.args, &outBuf, &errOut)
	}
	return hostileResult{code: code, stdout: outBuf.String(), stderr: errOut.String()}
}

func centerlineLength(t *testing.T, r hostileResult) float64 {
	t.Helper()
	var got struct {
		LengthMM float64 `json:"length_mm"`
	}
	if err := json.Unmarshal([]byte(r.stdout), &got); err != nil || got.LengthMM <= 0 {
		t.Fatalf("no centerline JSON (%v): %.200s\nstderr: %s", err, r.stdout, r.stderr)
	}
	return got.LengthMM
}
