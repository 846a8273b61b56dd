package mesh

import (
	"context"
	"fmt"
	"os"
	"testing"
	"time"
)

func TestZZStages(t *testing.T) {
	for _, name := range []string{"ordered", "scattered"} {
		p := "/tmp/tapersweep-loadbench1386992031/" + name + ".stl"
		for range 2 {
			f, size, _ := OpenInput(p, 0)
			head := make([]byte, 2048)
			f.Read(head)
			f.Seek(0, 0)
			rd := &stlReader{ctx: context.Background(), name: p, scale: 1, r: f, size: size}
			t0 := time.Now()
			rd.readBinary(head)
			t1 := time.Now()
			rd.checkOutliers()
			t2 := time.Now()
			first := firstOccurrences(rd.corners)
			t3 := time.Now()
			_ = first
			m := weld(rd.corners, 0, weldRelTol)
			t4 := time.Now()
			keep := 0
			for i := range m.Triangles {
				if !isDegenerate(m, i) {
					keep++
				}
			}
			t5 := time.Now()
			edgeCounts(m)
			t6 := time.Now()
			countShells(m)
			t7 := time.Now()
			signedVolume(m)
			t8 := time.Now()
			f.Close()
			fmt.Fprintf(os.Stderr, "%s read %v outl %v first %v weld(all) %v degen %v edges %v shells %v vol %v\n", name,
				t1.Sub(t0).Round(time.Millisecond), t2.Sub(t1).Round(time.Millisecond), t3.Sub(t2).Round(time.Millisecond), t4.Sub(t3).Round(time.Millisecond),
				t5.Sub(t4).Round(time.Millisecond), t6.Sub(t5).Round(time.Millisecond), t7.Sub(t6).Round(time.Millisecond), t8.Sub(t7).Round(time.Millisecond))
		}
	}
}
