package volume

import (
	"encoding/binary"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/suyashkumar/dicom/pkg/tag"
)

// checkDICOMLengths walks a DICOM file's elements (DICOM PS3.5 section 7: tag, VR, length)
// without reading their values and refuses one whose length runs past the end of the file.
// The parser allocates an element's value before reading it, so a corrupt length would make
// it ask for gigabytes; after this walk no value can be larger than the file.
func checkDICOMLengths(path string, f *os.File, size int64) error {
	head := make([]byte, 12)
	at := func(pos int64, n int) ([]byte, error) {
		if pos < 0 || pos+int64(n) > size {
			return nil, io.ErrUnexpectedEOF
		}
		if _, err := f.ReadAt(head[:n], pos); err != nil {
			return nil, err
		}
		return head[:n], nil
	}
	bad := func(g, e uint16, pos int64, n uint32) error {
		return fmt.Errorf("%s: element (%04X,%04X) at byte %d claims %d bytes but the file has %d left", path, g, e, pos, n, size-pos)
	}
	pos := int64(132)
	// File meta information: explicit VR little endian (PS3.10 7.1).
	ts := ""
	for pos+8 <= size {
		b, err := at(pos, 8)
		if err != nil {
			break
		}
		g, e := binary.LittleEndian.Uint16(b), binary.LittleEndian.Uint16(b[2:])
		if g != 0x0002 {
			break
		}
		hdr, n := int64(8), uint32(binary.LittleEndian.Uint16(b[6:]))
		if longVR(string(b[4:6])) {
			b, err = at(pos, 12)
			if err != nil {
				return fmt.Errorf("%s: file meta information cut short at byte %d", path, pos)
			}
			hdr, n = 12, binary.LittleEndian.Uint32(b[8:])
		}
		if int64(n) > size-pos-hdr {
			return bad(g, e, pos, n)
		}
		if e == 0x0010 && n < 256 {
			v := make([]byte, n)
			if _, err := f.ReadAt(v, pos+hdr); err == nil {
				ts = strings.Trim(string(v), "\x00 ")
			}
		}
		pos += hdr + int64(n)
	}
	var order binary.ByteOrder = binary.LittleEndian
	implicit := false
	switch ts {
	case "1.2.840.10008.1.2":
		implicit = true
	case "1.2.840.10008.1.2.2":
		order = binary.BigEndian
	case "1.2.840.10008.1.2.1.99":
		return fmt.Errorf("%s: deflated transfer syntax is not read: export the series uncompressed", path)
	}
	fragments := false // inside encapsulated pixel data: items hold raw bytes
	for pos < size {
		b, err := at(pos, 8)
		if err != nil {
			return fmt.Errorf("%s: an element is cut short at byte %d", path, pos)
		}
		g, e := order.Uint16(b), order.Uint16(b[2:])
		if g == 0xFFFE { // items and delimiters: tag and a 4-byte length, no VR
			n := order.Uint32(b[4:])
			switch {
			case e == 0xE0DD:
				fragments = false
			case fragments && e == 0xE000:
				if int64(n) > size-pos-8 {
					return bad(g, e, pos, n)
				}
				pos += int64(n)
			}
			pos += 8
			continue
		}
		var vr string
		var hdr int64 = 8
		var n uint32
		if implicit {
			n = order.Uint32(b[4:])
			if info, err := tag.Find(tag.Tag{Group: g, Element: e}); err == nil {
				vr = info.VR
			}
		} else {
			vr = string(b[4:6])
			n = uint32(order.Uint16(b[6:]))
			if longVR(vr) {
				if b, err = at(pos, 12); err != nil {
					return fmt.Errorf("%s: an element is cut short at byte %d", path, pos)
				}
				hdr, n = 12, order.Uint32(b[8:])
			}
		}
		switch {
		case n == 0xFFFFFFFF: // undefined length: items follow
			fragments = g == 0x7FE0 && e == 0x0010
			pos += hdr
		case vr == "SQ": // a sequence of defined length: walk into its items
			pos += hdr
		case int64(n) > size-pos-hdr:
			return bad(g, e, pos, n)
		default:
			pos += hdr + int64(n)
		}
	}
	return nil
}

// longVR tells the VRs whose explicit length takes 4 bytes after 2 reserved ones (PS3.5 7.1.2).
func longVR(vr string) bool {
	switch vr {
	case "OB", "OD", "OF", "OL", "OV", "OW", "SQ", "SV", "UC", "UN", "UR", "UT", "UV":
		return true
	}
	return false
}
