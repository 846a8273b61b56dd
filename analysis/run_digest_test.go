package analysis

import (
	"context"
	"crypto/sha256"
	"encoding/binary"
	"encoding/json"
	"fmt"
	"math"
	"testing"

	"tapersweep/mesh/digesttest"
	"tapersweep/models"
)

// Speed work on Run that must leave every figure of a run as it was: -run-digest-write FILE
// before the change, -run-digest-check FILE after (off unless a flag is given).
var runDigests = digesttest.Flags("run-digest", "TestRunDigest's runs")

// runDigestSequences are the sequences TestRunDigest takes through every canal: the benchmark's,
// the demo's, and one of other alloys, a variable taper, a square section, a short cutting
// length, a torque limit and pecks that wear a file out (the fracture's time and place).
var runDigestSequences = map[string]string{
	"bench": benchSequence,
	"demo":  string(models.DemoSequenceJSON()),
	"mixed": `{"steps": [
		{"size": 15, "taper": 0.02, "depth": "WL", "alloy": "stainless-steel", "rpm": 600, "peck_mm": 0.5, "retract_mm": 1},
		{"size": 20, "tapers": [[0, 0.06], [3, 0.04], [6, 0.02]], "depth": "WL-1", "section": "square", "alloy": "niti-martensitic"},
		{"size": 30, "taper": 0.05, "depth": "WL-0.5", "cutting_length": 8, "torque_limit_ncm": 1.5},
		{"size": 40, "taper": 0.04, "depth": "WL", "alloy": "stainless-steel", "rpm": 900, "peck_mm": 0.3, "retract_mm": 2}]}`,
}

// TestRunDigest runs each sequence of runDigestSequences through the benchmark's canal and
// every canal of TestCanalDigest, centred, elastic, and elastic on a soft wall, and digests
// every figure the run gives, bit for bit: per step the file's radius, the canal before, the
// cut and the canal after, strain, damage, torque and capacity along the file, the file's
// offsets, the metrics (with advice, transportation and the wall), the wall touched so far;
// the run's warnings, transportation, wall as scanned and the wall maps of the pictures.
func TestRunDigest(t *testing.T) {
	runDigests.Skip(t)
	canals := append([]digestCanal{{"bench", func() (*Canal, error) { _, c := benchScan(t); return c, nil }}}, digestCanals()...)
	var lines []string
	for _, j := range canals {
		c, err := j.measure()
		if err != nil {
			lines = append(lines, j.name+"\terror: "+err.Error())
			continue
		}
		for _, seqName := range []string{"bench", "demo", "mixed"} {
			seq, err := models.ParseSequence(seqName+".json", []byte(runDigestSequences[seqName]))
			if err != nil {
				t.Fatal(err)
			}
			for _, opt := range []RunOptions{{PathModel: "centred"}, {PathModel: "elastic"}, {PathModel: "elastic", WallStiffness: 100}} {
				name := fmt.Sprintf("%s\t%s\t%s %g", j.name, seqName, opt.PathModel, opt.WallStiffness)
				res, err := Run(context.Background(), c, seq, opt)
				d := "error: " + fmt.Sprint(err)
				if err == nil {
					d = runDigest(t, res)
				}
				lines = append(lines, name+"\t"+d)
				t.Logf("%s\t%s", name, d)
			}
		}
	}
	runDigests.Match(t, lines)
}

// runDigest is a short hash of every figure of a run, bit for bit, and a few figures to read.
func runDigest(t *testing.T, res *Result) string {
	h := sha256.New()
	put := func(v any) {
		if err := binary.Write(h, binary.LittleEndian, v); err != nil {
			t.Fatal(err)
		}
	}
	putJSON := func(v any) {
		b, err := json.Marshal(v)
		if err != nil {
			t.Fatal(err)
		}
		h.Write(b)
	}
	damage := 0.0
	for k, sr := range res.Steps {
		put(int64(sr.Number))
		put(sr.TipDepth)
		for _, a := range [][]float32{sr.FileRadius, sr.Before, sr.Cut, sr.Prepared} {
			put(int64(len(a)))
			put(a)
		}
		for _, a := range [][]float64{sr.Strain, sr.Damage, sr.Torque, sr.Capacity, sr.Offset1, sr.Offset2} {
			put(int64(len(a)))
			put(a)
		}
		put(sr.touched)
		putJSON(sr.Metrics)
		wall := res.WallMap(k + 1)
		put(int64(len(wall)))
		put(wall)
		damage = math.Max(damage, sr.Metrics.FatigueDamage)
	}
	putJSON(res.Warnings)
	putJSON(res.Moved)
	putJSON(res.ScannedWall)
	return fmt.Sprintf("%x\tsteps %d peak damage %.4g", sumOf(h), len(res.Steps), damage)
}
