package segment

import (
	"context"
	"encoding/binary"
	"fmt"
	"image"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
	"github.com/suyashkumar/dicom"
	"github.com/suyashkumar/dicom/pkg/tag"
	"golang.org/x/image/tiff"

	"tapersweep/analysis"
	"tapersweep/mesh/volume"
)

// benchTooth is an analytic root with a curved, tapering canal standing along -z in the
// middle of an n^3 grid of the given voxel, its edges blurred by a Gaussian of one voxel
// (erf steps), with noise: large volumes for the benchmarks without a slow generator.
// Intensities as the phantom's (pulp and periodontal space 40, dentine 1600, bone 700).
type benchTooth struct {
	n     int
	voxel float64
}

func (b benchTooth) size() float64 { return float64(b.n) * b.voxel }

// axis is the canal's centre at depth d below the top of the root, and its radius.
func (b benchTooth) axis(d float64) (x, y, rc, rr float64) {
	L := 0.7 * b.size()
	t := math.Max(0, math.Min(1, d/L))
	bend := 0.0
	if d > 0.4*L {
		bend = 0.5 * (d - 0.4*L) * (d - 0.4*L) / (0.5 * L)
	}
	return 0.45*b.size() + bend, 0.5 * b.size(), 0.45 - 0.33*t, 2.6 - 1.6*t
}

func (b benchTooth) top() float64 { return 0.85 * b.size() }

// ends are the canal's two ends in mm.
func (b benchTooth) ends() Points {
	L := 0.7 * b.size()
	x0, y0, _, _ := b.axis(0)
	x1, y1, _, _ := b.axis(L)
	return Points{Orifice: mgl64.Vec3{x0, y0, b.top()}, Apex: mgl64.Vec3{x1, y1, b.top() - L}}
}

// slice fills the stored values (intensity + 1024) of slice k.
func (b benchTooth) slice(k int, out []uint16) {
	z := float64(k) * b.voxel
	d := b.top() - z
	L := 0.7 * b.size()
	cx, cy, rc, rr := b.axis(math.Min(math.Max(d, 0), L))
	sigma := b.voxel * math.Sqrt2
	step := func(r, edge float64) float64 { return 0.5 * (1 + math.Erf((r-edge)/sigma)) }
	seed := uint32(k*7919 + 1)
	for j := range b.n {
		for i := range b.n {
			x, y := float64(i)*b.voxel, float64(j)*b.voxel
			r := math.Hypot(x-cx, y-cy)
			v := 40.0
			switch {
			case d < -1 || d > L+1:
				v = 700 // bone above and below the tooth, for simplicity
			default:
				canal := 1.0
				if d > L {
					canal = 0 // past the apex no canal
				}
				v = 40 + 1560*(step(r, canal*rc)-step(r, rr)) + 660*step(r, rr+0.2)
			}
			seed = seed*1664525 + 1013904223
			v += 80 * (float64(seed>>8)/float64(1<<24) - 0.5)
			out[j*b.n+i] = uint16(math.Max(0, math.Min(65535, v+1024)))
		}
	}
}

// writeSeries writes the tooth as a DICOM series with the dicom library's writer.
func (b benchTooth) writeSeries(tb testing.TB, dir string) {
	plane := make([]uint16, b.n*b.n)
	raw := make([]byte, 2*b.n*b.n)
	for k := range b.n {
		b.slice(k, plane)
		for i, s := range plane {
			binary.LittleEndian.PutUint16(raw[2*i:], s)
		}
		el := func(t tag.Tag, v any) *dicom.Element {
			e, err := dicom.NewElement(t, v)
			if err != nil {
				tb.Fatal(err)
			}
			return e
		}
		f := func(x float64) string { return strconv.FormatFloat(x, 'f', 6, 64) }
		uid := fmt.Sprintf("1.2.826.0.1.3680043.9.7777.%d", k+1)
		ds := dicom.Dataset{Elements: []*dicom.Element{
			el(tag.MediaStorageSOPClassUID, []string{"1.2.840.10008.5.1.4.1.1.2"}),
			el(tag.MediaStorageSOPInstanceUID, []string{uid}),
			el(tag.TransferSyntaxUID, []string{"1.2.840.10008.1.2.1"}),
			el(tag.SOPClassUID, []string{"1.2.840.10008.5.1.4.1.1.2"}),
			el(tag.SOPInstanceUID, []string{uid}),
			el(tag.Modality, []string{"CT"}),
			el(tag.SeriesInstanceUID, []string{"1.2.826.0.1.3680043.9.7777.0"}),
			el(tag.ImagePositionPatient, []string{"0", "0", f(float64(k) * b.voxel)}),
			el(tag.ImageOrientationPatient, []string{"1", "0", "0", "0", "1", "0"}),
			el(tag.SamplesPerPixel, []int{1}),
			el(tag.PhotometricInterpretation, []string{"MONOCHROME2"}),
			el(tag.Rows, []int{b.n}),
			el(tag.Columns, []int{b.n}),
			el(tag.PixelSpacing, []string{f(b.voxel), f(b.voxel)}),
			el(tag.BitsAllocated, []int{16}),
			el(tag.BitsStored, []int{16}),
			el(tag.HighBit, []int{15}),
			el(tag.PixelRepresentation, []int{0}),
			el(tag.RescaleIntercept, []string{"-1024"}),
			el(tag.RescaleSlope, []string{"1"}),
			el(tag.PixelData, dicom.PixelDataInfo{IntentionallyUnprocessed: true, UnprocessedValueData: raw}),
		}}
		out, err := os.Create(filepath.Join(dir, fmt.Sprintf("slice%04d.dcm", k)))
		if err != nil {
			tb.Fatal(err)
		}
		if err := dicom.Write(out, ds, dicom.SkipVRVerification()); err != nil {
			tb.Fatal(err)
		}
		out.Close()
	}
}

// writeStack writes the tooth as 16-bit TIFF slices.
func (b benchTooth) writeStack(tb testing.TB, dir string) {
	plane := make([]uint16, b.n*b.n)
	img := image.NewGray16(image.Rect(0, 0, b.n, b.n))
	for k := range b.n {
		b.slice(k, plane)
		for i, s := range plane {
			img.Pix[2*i], img.Pix[2*i+1] = uint8(s>>8), uint8(s)
		}
		out, err := os.Create(filepath.Join(dir, fmt.Sprintf("slice%04d.tif", k)))
		if err != nil {
			tb.Fatal(err)
		}
		if err := tiff.Encode(out, img, nil); err != nil {
			tb.Fatal(err)
		}
		out.Close()
	}
}

// peakMemory is the process's peak resident memory (VmHWM), bytes; 0 if unknown.
func peakMemory() float64 {
	b, err := os.ReadFile("/proc/self/status")
	if err != nil {
		return 0
	}
	for _, line := range strings.Split(string(b), "\n") {
		if strings.HasPrefix(line, "VmHWM:") {
			f := strings.Fields(line)
			kb, _ := strconv.ParseFloat(f[1], 64)
			return kb * 1024
		}
	}
	return 0
}

// benchLoadSegment times opening the scan and finding the canal and root in it.
func benchLoadSegment(b *testing.B, scan string, opt volume.Options, pts Points) {
	b.ResetTimer()
	for b.Loop() {
		v, err := volume.Open(context.Background(), scan, opt)
		if err != nil {
			b.Fatal(err)
		}
		res, err := Find(context.Background(), v, pts, Options{})
		if err != nil {
			b.Fatal(err)
		}
		if _, err := res.Measure(context.Background(), "bench", analysis.CanalOptions{}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(peakMemory()/(1<<20), "peak-MB")
}

// Target (issue): load + segment a 400^3 16-bit CBCT (a DICOM series) in at most 5 s on two
// cores.
func BenchmarkLoadSegmentCBCT400(b *testing.B) {
	tooth := benchTooth{n: 400, voxel: 0.075}
	dir := b.TempDir()
	tooth.writeSeries(b, dir)
	benchLoadSegment(b, dir, volume.Options{}, tooth.ends())
}

// Target (issue): a 1000^3 micro-CT stack (16-bit TIFF, 0.02 mm) without running out of
// 24 GB. Writing the 2 GB stack takes a few minutes; the scan is read and segmented once.
func BenchmarkLoadSegmentMicroCT1000(b *testing.B) {
	tooth := benchTooth{n: 1000, voxel: 0.02}
	dir := b.TempDir()
	tooth.writeStack(b, dir)
	benchLoadSegment(b, dir, volume.Options{Voxel: 0.02}, tooth.ends())
}
