package main

import (
	"bytes"
	"encoding/binary"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"image/png"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"tapersweep/mesh"
	"tapersweep/models"
)

// Big inputs at and past the size limits, each run as its own process with its peak memory
// measured: every answer within 4 GB. Only with -hostile.exec (it writes about 3 GB of files,
// most of them sparse, and takes minutes).
func TestHostileBigInputs(t *testing.T) {
	if *hostileExec == "" {
		t.Skip("needs -hostile.exec=BINARY (see .ci/hostile.sh)")
	}
	dir := t.TempDir()
	sparse := func(name string, size int64, head []byte) string {
		p := filepath.Join(dir, name)
		f, err := os.Create(p)
		if err != nil {
			t.Fatal(err)
		}
		f.Write(head)
		if err := f.Truncate(size); err != nil {
			t.Fatal(err)
		}
		f.Close()
		return p
	}
	overCount := make([]byte, 84)
	binary.LittleEndian.PutUint32(overCount[80:], mesh.MaxTriangles+1)
	// A closed canal just under the triangle cap.
	spec := models.ExampleCanals()[2].Spec
	const around = 256
	ds := 2 * around * spec.Length() / (mesh.MaxTriangles - 20_000)
	atCap := filepath.Join(dir, "at_cap.stl")
	m := spec.Mesh(ds, around)
	if err := mesh.WriteSTLFile(atCap, m); err != nil {
		t.Fatal(err)
	}
	t.Logf("at_cap.stl: %d triangles", len(m.Triangles))
	// The same in scattered order, the weld's worst case for memory.
	rng := rand.New(rand.NewPCG(21, 22))
	rng.Shuffle(len(m.Triangles), func(i, j int) { m.Triangles[i], m.Triangles[j] = m.Triangles[j], m.Triangles[i] })
	atCapScattered := filepath.Join(dir, "at_cap_scattered.stl")
	if err := mesh.WriteSTLFile(atCapScattered, m); err != nil {
		t.Fatal(err)
	}
	m = nil
	noise := filepath.Join(dir, "noise.stl")
	if f, err := os.Create(noise); err == nil {
		f.WriteString("solid noise\n")
		line := []byte(strings.Repeat("no facet on this line, only words ", 3) + "\n")
		for range (100 << 20) / len(line) {
			f.Write(line)
		}
		f.Close()
	}
	cases := []hostileCase{
		{name: "binary count over the cap", args: []string{"centerline", "--canal", sparse("over_count.stl", 84+50*int64(mesh.MaxTriangles+1), overCount)},
			code: exitBadInput, say: []string{"over_count.stl", "coarser"}},
		{name: "file over the size cap", args: []string{"centerline", "--canal", sparse("over_size.stl", mesh.MaxSTLBytes+1, []byte("solid x\n"))},
			code: exitBadInput, say: []string{"over_size.stl", "more than"}},
		{name: "100 MB of ASCII without a facet", args: []string{"centerline", "--canal", noise},
			code: exitBadInput, say: []string{"noise.stl", "no triangle", "lines 2-"}},
		{name: "surface at the triangle cap", args: []string{"surface", "--canal", atCap}, code: exitOK, say: []string{"slow"}},
		{name: "surface at the triangle cap, scattered", args: []string{"surface", "--canal", atCapScattered}, code: exitOK, say: []string{"slow"}},
		{name: "centerline at the triangle cap", args: []string{"centerline", "--canal", atCap, "--format", "csv"}, code: exitOK, say: []string{"slow"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			start := time.Now()
			r := hostileRun(t, c)
			t.Logf("exit %d in %.1f s, peak memory %.0f MB", r.code, time.Since(start).Seconds(), float64(r.maxRSS)/(1<<20))
			if r.code != c.code {
				t.Fatalf("exit %d, want %d: %s", r.code, c.code, r.stderr)
			}
			for _, s := range c.say {
				if !strings.Contains(r.stderr, s) {
					t.Errorf("stderr does not say %q: %s", s, r.stderr)
				}
			}
			if r.maxRSS > 4<<30 {
				t.Errorf("peak memory %.1f GB, over 4 GB", float64(r.maxRSS)/(1<<30))
			}
		})
	}
}

// writingCommand is a command that writes files, and how to tell a whole output from a cut one.
type writingCommand struct {
	name  string
	args  []string
	files []string                // the outputs
	whole func(data []byte) error // per output, by its extension
}

func wholeOutput(path string, data []byte) error {
	switch filepath.Ext(path) {
	case ".pdf":
		if !bytes.HasPrefix(data, []byte("%PDF")) || !bytes.Contains(data[max(0, len(data)-64):], []byte("%%EOF")) {
			return fmt.Errorf("not a whole PDF (%d bytes)", len(data))
		}
	case ".png":
		if _, err := png.Decode(bytes.NewReader(data)); err != nil {
			return err
		}
	case ".json":
		if !json.Valid(data) {
			return fmt.Errorf("not whole JSON (%d bytes)", len(data))
		}
	case ".stl":
		if len(data) < 84 || int64(len(data)) != 84+50*int64(binary.LittleEndian.Uint32(data[80:])) {
			return fmt.Errorf("not a whole binary STL (%d bytes)", len(data))
		}
	case ".csv":
		rows, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
		if err != nil || len(rows) < 2 || !bytes.HasSuffix(data, []byte("\n")) {
			return fmt.Errorf("not a whole table (%d rows, %v)", len(rows), err)
		}
	}
	return nil
}

// kill -9 at random moments during 20 runs of each writing command: every output file is,
// after each kill, either the old file untouched or a whole new one, never missing or cut.
// SIGTERM (a scheduler's time limit) also removes the temporaries. Only with -hostile.exec.
func TestHostileKillDuringWrites(t *testing.T) {
	if *hostileExec == "" {
		t.Skip("needs -hostile.exec=BINARY (see .ci/hostile.sh)")
	}
	dir := t.TempDir()
	hostileFixture(t, dir) // canal.stl, seq.json, study/
	os.Remove(filepath.Join(dir, "study", "plan.json"))
	for i := range 3 {
		data, _ := os.ReadFile(filepath.Join(dir, "canal.stl"))
		os.WriteFile(filepath.Join(dir, "study", fmt.Sprintf("c%d.stl", i)), data, 0o644)
	}
	out := filepath.Join(dir, "written")
	os.MkdirAll(out, 0o755)
	canal, seq := filepath.Join(dir, "canal.stl"), filepath.Join(dir, "seq.json")
	o := func(n string) string { return filepath.Join(out, n) }
	cmds := []writingCommand{
		{name: "report", args: []string{"report", "--canal", canal, "--sequence", seq, "--out", o("r.pdf")}, files: []string{o("r.pdf")}},
		{name: "render", args: []string{"render", "--canal", canal, "--sequence", seq, "--step", "2", "--out", o("r.png")}, files: []string{o("r.png")}},
		{name: "plan", args: []string{"plan", "--canal", canal, "--target", "25/.04", "--max-steps", "3", "--out", o("p.json")}, files: []string{o("p.json")}},
		{name: "demo", args: []string{"demo", "--out", o("demo")}, files: []string{o("demo/demo-canal.json"), o("demo/demo-canal.stl"), o("demo/demo-sequence.json")}},
		{name: "batch", args: []string{"batch", "--canals", filepath.Join(dir, "study"), "--sequence", seq, "--out", o("b.csv"), "--jobs", "1"}, files: []string{o("b.csv")}},
	}
	rng := rand.New(rand.NewPCG(2026, 13))
	for _, c := range cmds {
		t.Run(c.name, func(t *testing.T) {
			start := time.Now()
			if b, err := exec.Command(*hostileExec, c.args...).CombinedOutput(); err != nil {
				t.Fatalf("first run: %v\n%s", err, b)
			}
			full := time.Since(start)
			old := map[string][]byte{}
			for _, f := range c.files {
				old[f], _ = os.ReadFile(f)
			}
			killedEarly := 0
			for run := range 20 {
				cmd := exec.Command(*hostileExec, c.args...)
				if err := cmd.Start(); err != nil {
					t.Fatal(err)
				}
				time.Sleep(time.Duration(rng.Float64() * 1.1 * float64(full)))
				cmd.Process.Signal(syscall.SIGKILL)
				if err := cmd.Wait(); err != nil {
					killedEarly++
				}
				for _, f := range c.files {
					data, err := os.ReadFile(f)
					if err != nil {
						t.Fatalf("run %d: %s is gone: %v", run+1, f, err)
					}
					if !bytes.Equal(data, old[f]) {
						if err := wholeOutput(f, data); err != nil {
							t.Fatalf("run %d: %s under its final name is cut: %v", run+1, f, err)
						}
					}
				}
			}
			left, _ := filepath.Glob(filepath.Join(out, ".*.partial"))
			more, _ := filepath.Glob(filepath.Join(out, "demo", ".*.partial"))
			t.Logf("%s: a run takes %.1f s; 20 kills, %d before the end; every output whole; %d hidden temporaries left by kill -9",
				c.name, full.Seconds(), killedEarly, len(left)+len(more))
			for _, f := range append(left, more...) {
				os.Remove(f)
			}

			// SIGTERM half way: exit 143, old output kept, no temporary left.
			cmd := exec.Command(*hostileExec, c.args...)
			var errOut bytes.Buffer
			cmd.Stderr = &errOut
			cmd.Start()
			time.Sleep(full / 2)
			cmd.Process.Signal(syscall.SIGTERM)
			err := cmd.Wait()
			left, _ = filepath.Glob(filepath.Join(out, ".*.partial"))
			more, _ = filepath.Glob(filepath.Join(out, "demo", ".*.partial"))
			if len(left)+len(more) > 0 {
				t.Errorf("SIGTERM left temporaries: %v %v (exit %v, %s)", left, more, err, errOut.String())
			}
			for _, f := range c.files {
				data, _ := os.ReadFile(f)
				if werr := wholeOutput(f, data); werr != nil {
					t.Errorf("after SIGTERM %s: %v", f, werr)
				}
			}
		})
	}
}
