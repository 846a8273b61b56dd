package mesh

import (
	"fmt"
	"io/fs"
	"os"
)

// OpenInput opens a file to read, refusing what is not a regular file (a named pipe would block
// the read forever, a device such as /dev/zero never ends) and files longer than maxBytes
// (0: no limit). It returns the file and its length. Errors name the path.
func OpenInput(path string, maxBytes int64) (*os.File, int64, error) {
	// Stat before opening: opening a named pipe for reading blocks until a writer comes.
	st, err := os.Stat(path)
	if err != nil {
		return nil, 0, fmt.Errorf("%s: cannot open: %w", path, err)
	}
	if err := regularInput(path, st); err != nil {
		return nil, 0, err
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, 0, fmt.Errorf("%s: cannot open: %w", path, err)
	}
	if st, err = f.Stat(); err != nil {
		f.Close()
		return nil, 0, fmt.Errorf("%s: %w", path, err)
	}
	if err := regularInput(path, st); err != nil {
		f.Close()
		return nil, 0, err
	}
	if maxBytes > 0 && st.Size() > maxBytes {
		f.Close()
		return nil, 0, fmt.Errorf("%s: %s, more than the %s this kind of file can need", path, byteSize(st.Size()), byteSize(maxBytes))
	}
	return f, st.Size(), nil
}

func regularInput(path string, st fs.FileInfo) error {
	m := st.Mode()
	switch {
	case m.IsRegular():
		return nil
	case m.IsDir():
		return fmt.Errorf("%s: is a folder, not a file", path)
	case m&fs.ModeNamedPipe != 0:
		return fmt.Errorf("%s: is a named pipe, not a file; save the data to a file first", path)
	case m&fs.ModeDevice != 0:
		return fmt.Errorf("%s: is a device, not a file", path)
	default:
		return fmt.Errorf("%s: is not a regular file", path)
	}
}

// byteSize writes a length for people: 1.5 GB, 320 kB, 12 bytes.
func byteSize(n int64) string {
	switch {
	case n >= 1<<30:
		return fmt.Sprintf("%.1f GB", float64(n)/(1<<30))
	case n >= 1<<20:
		return fmt.Sprintf("%.1f MB", float64(n)/(1<<20))
	case n >= 1<<10:
		return fmt.Sprintf("%.0f kB", float64(n)/(1<<10))
	}
	return fmt.Sprintf("%d bytes", n)
}
