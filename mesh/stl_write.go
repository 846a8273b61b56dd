package mesh

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"os"

	"github.com/hschendel/stl"
)

// WriteSTL writes m as binary STL through github.com/hschendel/stl: an 80-byte header holding
// name, the triangle count, then per triangle the unit normal, three corners (float32, little
// endian) and two zero bytes.
func WriteSTL(w io.Writer, m *Mesh, name string) error {
	if int64(len(m.Triangles)) > math.MaxUint32 {
		return fmt.Errorf("binary STL holds at most %d triangles, the mesh has %d", uint32(math.MaxUint32), len(m.Triangles))
	}
	return writeSolid(w, m, name, false)
}

// writeSolid hands m to the STL library as a solid and writes it buffered.
func writeSolid(w io.Writer, m *Mesh, name string, ascii bool) error {
	solid := stl.Solid{Name: name, IsAscii: ascii, Triangles: make([]stl.Triangle, len(m.Triangles))}
	f32 := func(v [3]float64) stl.Vec3 { return stl.Vec3{float32(v[0]), float32(v[1]), float32(v[2])} }
	for t := range m.Triangles {
		a, b, c := m.Corners(t)
		solid.Triangles[t] = stl.Triangle{Normal: f32(FaceNormal(m, t)), Vertices: [3]stl.Vec3{f32(a), f32(b), f32(c)}}
	}
	bw := bufio.NewWriterSize(w, 1<<16)
	if err := solid.WriteAll(bw); err != nil {
		return err
	}
	return bw.Flush()
}

// WriteSTLFile writes m as binary STL to path, named after the file.
func WriteSTLFile(path string, m *Mesh) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	if err := WriteSTL(f, m, "tapersweep "+baseName(path)); err != nil {
		f.Close()
		return fmt.Errorf("%s: %w", path, err)
	}
	if err := f.Close(); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	return nil
}

func baseName(path string) string {
	for i := len(path) - 1; i >= 0; i-- {
		if path[i] == '/' || path[i] == '\\' {
			return path[i+1:]
		}
	}
	return path
}

// WriteASCIISTL writes m as ASCII STL through github.com/hschendel/stl. Coordinates carry
// float32 precision in the shortest form that reads back to the same float32, so ASCII and
// binary copies weld alike.
func WriteASCIISTL(w io.Writer, m *Mesh, name string) error {
	return writeSolid(w, m, asciiName(name), true)
}

// asciiName keeps a solid name on one line of plain words.
func asciiName(s string) string {
	b := []byte(s)
	for i, c := range b {
		if c < 0x20 || c >= 0x7F {
			b[i] = '_'
		}
	}
	return string(b)
}
