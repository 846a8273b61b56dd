package report

import (
	"bufio"
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"sync"
)

// Every file the program writes (reports, pictures, tables, sequences, the demo, batch
// tables, the window's saves) goes through Create/WriteFile: the bytes go to a temporary file
// in the same folder, which is synced and then renamed over the final name. A failed write, a
// full disk or a kill leaves the old file as it was and never a truncated one under its name.

// PendingFile is a file being written: Write into it, then Commit (or Discard).
type PendingFile struct {
	final string // the path written at last (symlinks resolved)
	tmp   string
	f     *os.File
	bw    *bufio.Writer
	mode  fs.FileMode // the existing file's mode, kept; 0 for a new file
	done  bool
}

// pending are the temporaries not yet committed or discarded, so a signal handler can remove
// them (DiscardAllPending).
var (
	pendingMu   sync.Mutex
	pendingTmps = map[string]bool{}
	exiting     bool
)

// maxSymlinks bounds how many links are followed, as the kernel does.
const maxSymlinks = 40

// resolveTarget follows symlinks at path to the file they name (which may not exist yet) and
// refuses what is not a regular file: a folder, a device, a FIFO, a socket.
func resolveTarget(path string) (string, fs.FileInfo, error) {
	p := path
	for range maxSymlinks {
		st, err := os.Lstat(p)
		if errors.Is(err, fs.ErrNotExist) {
			return p, nil, nil
		}
		if err != nil {
			return "", nil, err
		}
		if st.Mode()&fs.ModeSymlink == 0 {
			if !st.Mode().IsRegular() {
				what := "not a regular file"
				switch {
				case st.IsDir():
					what = "a folder"
				case st.Mode()&fs.ModeDevice != 0:
					what = "a device"
				case st.Mode()&fs.ModeNamedPipe != 0:
					what = "a named pipe"
				case st.Mode()&fs.ModeSocket != 0:
					what = "a socket"
				}
				return "", nil, fmt.Errorf("%s: is %s; write to a regular file", path, what)
			}
			return p, st, nil
		}
		link, err := os.Readlink(p)
		if err != nil {
			return "", nil, err
		}
		if !filepath.IsAbs(link) {
			link = filepath.Join(filepath.Dir(p), link)
		}
		p = link
	}
	return "", nil, fmt.Errorf("%s: too many levels of symbolic links", path)
}

// Create starts writing path: a temporary file beside the final one (beside a symlink's
// target). Nothing at path changes until Commit.
func Create(path string) (*PendingFile, error) {
	final, st, err := resolveTarget(path)
	if err != nil {
		return nil, err
	}
	dir, base := filepath.Split(final)
	if dir == "" {
		dir = "."
	}
	pf := &PendingFile{final: final}
	if st != nil {
		pf.mode = st.Mode().Perm()
	}
	for range 100 {
		var r [6]byte
		rand.Read(r[:])
		tmp := filepath.Join(dir, "."+base+"."+hex.EncodeToString(r[:])+".partial")
		// 0666 less the umask, as a new file made by any other program.
		f, err := os.OpenFile(tmp, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o666)
		if errors.Is(err, fs.ErrExist) {
			continue
		}
		if err != nil {
			return nil, fmt.Errorf("%s: cannot write in its folder: %w", path, err)
		}
		pendingMu.Lock()
		if exiting {
			pendingMu.Unlock()
			f.Close()
			os.Remove(tmp)
			return nil, fmt.Errorf("%s: the program is stopping", path)
		}
		pendingTmps[tmp] = true
		pendingMu.Unlock()
		pf.tmp, pf.f, pf.bw = tmp, f, bufio.NewWriterSize(f, 1<<16)
		return pf, nil
	}
	return nil, fmt.Errorf("%s: cannot find a free temporary name in its folder", path)
}

// Write adds bytes to the pending file.
func (p *PendingFile) Write(b []byte) (int, error) {
	if p.done {
		return 0, fs.ErrClosed
	}
	return p.bw.Write(b)
}

// Name is the final path (after symlinks).
func (p *PendingFile) Name() string { return p.final }

// Commit flushes, syncs and renames the file into place, keeping an existing file's mode. On
// any failure the temporary is removed and the old file is untouched.
func (p *PendingFile) Commit() error {
	if p.done {
		return fs.ErrClosed
	}
	p.done = true
	err := p.bw.Flush()
	if err == nil && p.mode != 0 {
		err = p.f.Chmod(p.mode)
	}
	if err == nil {
		err = p.f.Sync()
	}
	if cerr := p.f.Close(); err == nil {
		err = cerr
	}
	pendingMu.Lock()
	defer pendingMu.Unlock()
	if err == nil && exiting {
		err = errors.New("the program is stopping")
	}
	if err == nil {
		err = os.Rename(p.tmp, p.final)
	}
	delete(pendingTmps, p.tmp)
	if err != nil {
		os.Remove(p.tmp)
		return fmt.Errorf("%s: %w", p.final, err)
	}
	// The rename is durable only once the folder is synced; not every system allows it.
	if d, derr := os.Open(filepath.Dir(p.final)); derr == nil {
		d.Sync()
		d.Close()
	}
	return nil
}

// Discard removes the temporary; the final file stays as it was. Discarding a committed file
// does nothing, so `defer p.Discard()` is safe.
func (p *PendingFile) Discard() {
	if p.done {
		return
	}
	p.done = true
	p.f.Close()
	pendingMu.Lock()
	delete(pendingTmps, p.tmp)
	pendingMu.Unlock()
	os.Remove(p.tmp)
}

// WriteFile writes path through a pending file: write fills it, and it is committed only when
// write returns nil.
func WriteFile(path string, write func(io.Writer) error) error {
	p, err := Create(path)
	if err != nil {
		return err
	}
	defer p.Discard()
	if err := write(p); err != nil {
		return err
	}
	return p.Commit()
}

// DiscardAllPending removes every temporary not yet committed and stops later commits: for a
// signal handler that is about to end the program. A commit already renaming finishes first
// (its file is whole); any later one fails. It returns how many temporaries it removed.
func DiscardAllPending() int {
	pendingMu.Lock()
	defer pendingMu.Unlock()
	exiting = true
	n := len(pendingTmps)
	for tmp := range pendingTmps {
		os.Remove(tmp)
		delete(pendingTmps, tmp)
	}
	return n
}

// CheckTarget tells, before any work is done, whether path can be written: a regular file, a
// new name, or a symlink to either.
func CheckTarget(path string) error {
	final, _, err := resolveTarget(path)
	if err != nil {
		return err
	}
	dir := filepath.Dir(final)
	if st, err := os.Stat(dir); err != nil || !st.IsDir() {
		return fmt.Errorf("%s: its folder %s does not exist", path, dir)
	}
	return nil
}
