package mesh

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
)

// WriteSTL writes m as binary STL: an 80-byte header holding name, the triangle count, then
// per triangle the unit normal, three corners (float32, little endian) and two zero bytes.
func WriteSTL(w io.Writer, m *Mesh, name string) error {
	if int64(len(m.Triangles)) > math.MaxUint32 {
		return fmt.Errorf("binary STL holds at most %d triangles, the mesh has %d", uint32(math.MaxUint32), len(m.Triangles))
	}
	bw := bufio.NewWriterSize(w, 1<<16)
	var head [stlHeaderSize]byte
	copy(head[:80], name)
	binary.LittleEndian.PutUint32(head[80:], uint32(len(m.Triangles)))
	if _, err := bw.Write(head[:]); err != nil {
		return err
	}
	var rec [stlRecordSize]byte
	put := func(off int, v [3]float64) {
		for k := 0; k < 3; k++ {
			binary.LittleEndian.PutUint32(rec[off+4*k:], math.Float32bits(float32(v[k])))
		}
	}
	for t := range m.Triangles {
		a, b, c := m.Corners(t)
		put(0, FaceNormal(m, t))
		put(12, a)
		put(24, b)
		put(36, c)
		if _, err := bw.Write(rec[:]); err != nil {
			return err
		}
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

// WriteASCIISTL writes m as ASCII STL. Coordinates carry float32 precision in the shortest
// form that reads back to the same float32, so ASCII and binary copies weld alike.
func WriteASCIISTL(w io.Writer, m *Mesh, name string) error {
	bw := bufio.NewWriterSize(w, 1<<16)
	name = asciiName(name)
	var buf []byte
	buf = append(buf, "solid "...)
	buf = append(buf, name...)
	buf = append(buf, '\n')
	vec := func(prefix string, v [3]float64) {
		buf = append(buf, prefix...)
		for k := 0; k < 3; k++ {
			buf = append(buf, ' ')
			buf = strconv.AppendFloat(buf, float64(float32(v[k])), 'g', -1, 32)
		}
		buf = append(buf, '\n')
	}
	for t := range m.Triangles {
		a, b, c := m.Corners(t)
		vec("facet normal", FaceNormal(m, t))
		buf = append(buf, "  outer loop\n"...)
		vec("    vertex", a)
		vec("    vertex", b)
		vec("    vertex", c)
		buf = append(buf, "  endloop\nendfacet\n"...)
		if _, err := bw.Write(buf); err != nil {
			return err
		}
		buf = buf[:0]
	}
	buf = append(buf, "endsolid "...)
	buf = append(buf, name...)
	buf = append(buf, '\n')
	if _, err := bw.Write(buf); err != nil {
		return err
	}
	return bw.Flush()
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
