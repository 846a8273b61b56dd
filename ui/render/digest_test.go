package render

import (
	"bufio"
	"crypto/sha256"
	"encoding/binary"
	"fmt"
	"image"
	"math"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh/digesttest"
)

// Speed work that must leave every frame as it was: render the benchmark scenes and a few more,
// write one digest per frame (-frame-digest-write FILE) with the code before the change, then
// check against it (-frame-digest-check FILE) after. Off unless a flag is given: the digests
// belong to one machine's build, not the repo.
var frameDigests = digesttest.Flags("frame-digest", "TestFrameDigest's frames")

// TestFrameDigest digests, bit for bit, each frame's pixels and what Pick answers from (the
// depth, object and triangle buffers of both layers), on the benchmark scenes and on views that
// take the other paths: cut, eye inside, near plane crossing, supersampled, an odd size.
func TestFrameDigest(t *testing.T) {
	frameDigests.Skip(t)
	type view struct {
		name string
		w, h int
		opt  Options
		make func() (*Scene, *Camera)
	}
	canal200kOrbit := func() (*Scene, *Camera) {
		s, cam := canal200k()
		cam.Orbit(0.4, 0.2)
		return s, cam
	}
	inside := func(opacity float64) func() (*Scene, *Camera) {
		return func() (*Scene, *Camera) {
			s, _ := canal200k()
			s.Objects = s.Objects[1:]
			s.Objects[0].Opacity = opacity
			return s, &Camera{Target: mgl64.Vec3{0, 0, -9}, Distance: 8.5, Pitch: 1.5707963, FovY: 1.0}
		}
	}
	views := []view{
		{"243k opaque", 1280, 800, Options{}, func() (*Scene, *Camera) { return canalOfSize(1215, 100, 1) }},
		{"4M turning", 1280, 800, Options{Turning: true}, func() (*Scene, *Camera) { return canalOfSize(10000, 200, 0.35) }},
		{"4M still", 1280, 800, Options{}, func() (*Scene, *Camera) { return canalOfSize(10000, 200, 0.35) }},
		{"200k", 1280, 800, Options{}, canal200kOrbit},
		{"200k zoomed", 1280, 800, Options{}, func() (*Scene, *Camera) {
			s, cam := canal200kOrbit()
			cam.Dolly(0.3)
			return s, cam
		}},
		{"200k clipped", 1280, 800, Options{}, func() (*Scene, *Camera) {
			s, cam := canal200k()
			s.ClipPlane = &Plane{Point: mgl64.Vec3{}, Normal: mgl64.Vec3{0, 1, 0}}
			return s, cam
		}},
		{"200k inside", 1280, 800, Options{}, inside(0.35)},
		{"200k inside opaque", 1280, 800, Options{}, inside(1)},
		{"200k supersampled", 1280, 800, Options{Supersample: 2}, func() (*Scene, *Camera) { return canal200k() }},
		{"1M opaque", 1280, 800, Options{}, func() (*Scene, *Camera) {
			s, cam := canalScene(2500, 200)
			s.Objects = s.Objects[1:]
			s.Objects[0].Opacity = 1
			return s, cam
		}},
		{"243k opaque close, odd size", 997, 613, Options{}, func() (*Scene, *Camera) {
			s, cam := canalOfSize(1215, 100, 1)
			cam.Dolly(0.9) // the near plane cuts the wall
			cam.Orbit(1.1, -0.3)
			return s, cam
		}},
		{"243k opaque cut, supersampled", 640, 400, Options{Supersample: 3}, func() (*Scene, *Camera) {
			s, cam := canalOfSize(1215, 100, 1)
			s.ClipPlane = &Plane{Point: mgl64.Vec3{0.05, 0, -3}, Normal: mgl64.Vec3{-0.5, 1, 0}}
			cam.Orbit(2.5, 0.4)
			return s, cam
		}},
	}
	r := NewRenderer()
	defer r.Close()
	var lines []string
	for _, v := range views {
		s, cam := v.make()
		img := image.NewRGBA(image.Rect(0, 0, v.w, v.h))
		for frame := range 2 { // a fresh frame, then one that reuses the renderer's buffers
			r.Render(img, s, cam, v.opt)
			lines = append(lines, fmt.Sprintf("%s, frame %d: %x", v.name, frame, frameDigest(r, img)))
		}
	}
	frameDigests.Match(t, lines)
}

// frameDigest hashes img's pixels and r's per-sample depth, object and triangle buffers.
func frameDigest(r *Renderer, img *image.RGBA) []byte {
	h := sha256.New()
	h.Write(img.Pix)
	w := bufio.NewWriter(h)
	var b [4]byte
	for i := range r.z {
		binary.LittleEndian.PutUint32(b[:], math.Float32bits(r.z[i]))
		w.Write(b[:])
		binary.LittleEndian.PutUint32(b[:], math.Float32bits(r.tz[i]))
		w.Write(b[:])
		binary.LittleEndian.PutUint16(b[:], r.oObj[i])
		binary.LittleEndian.PutUint16(b[2:], r.tObj[i])
		w.Write(b[:])
		binary.LittleEndian.PutUint32(b[:], uint32(r.triID[i]))
		w.Write(b[:])
	}
	w.Flush()
	return h.Sum(nil)
}
