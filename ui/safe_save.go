package ui

import (
	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/storage/repository"

	"tapersweep/ui/report"
)

// The toolkit's save dialog opens the chosen file with a truncating writer before the program
// has produced a byte, so a failed or cancelled save would leave the old file empty. The
// window therefore replaces the writer of the "file" scheme with the program's safe writer
// (a temporary beside the file, renamed over it when whole) and forwards everything else to
// the toolkit's own repository.

// useSafeFileWriter wraps the registered "file" repository once.
func useSafeFileWriter() {
	base, err := repository.ForScheme("file")
	if err != nil {
		return
	}
	if _, done := base.(safeFileRepository); done {
		return
	}
	repository.Register("file", safeFileRepository{base})
}

type safeFileRepository struct{ repository.Repository }

// safeURIWriter commits on Close; Abort throws the temporary away.
type safeURIWriter struct {
	*report.PendingFile
	uri fyne.URI
}

func (w safeURIWriter) URI() fyne.URI { return w.uri }
func (w safeURIWriter) Close() error  { return w.Commit() }
func (w safeURIWriter) Abort()        { w.Discard() }

func (r safeFileRepository) Writer(u fyne.URI) (fyne.URIWriteCloser, error) {
	p, err := report.Create(u.Path())
	if err != nil {
		return nil, err
	}
	return safeURIWriter{p, u}, nil
}

func (r safeFileRepository) CanWrite(u fyne.URI) (bool, error) {
	if w, ok := r.Repository.(repository.WritableRepository); ok {
		return w.CanWrite(u)
	}
	return false, repository.ErrOperationNotSupported
}

func (r safeFileRepository) Delete(u fyne.URI) error {
	if w, ok := r.Repository.(repository.WritableRepository); ok {
		return w.Delete(u)
	}
	return repository.ErrOperationNotSupported
}

func (r safeFileRepository) Appender(u fyne.URI) (fyne.URIWriteCloser, error) {
	if a, ok := r.Repository.(repository.AppendableRepository); ok {
		return a.Appender(u)
	}
	return nil, repository.ErrOperationNotSupported
}

func (r safeFileRepository) CanList(u fyne.URI) (bool, error) {
	if l, ok := r.Repository.(repository.ListableRepository); ok {
		return l.CanList(u)
	}
	return false, repository.ErrOperationNotSupported
}

func (r safeFileRepository) List(u fyne.URI) ([]fyne.URI, error) {
	if l, ok := r.Repository.(repository.ListableRepository); ok {
		return l.List(u)
	}
	return nil, repository.ErrOperationNotSupported
}

func (r safeFileRepository) CreateListable(u fyne.URI) error {
	if l, ok := r.Repository.(repository.ListableRepository); ok {
		return l.CreateListable(u)
	}
	return repository.ErrOperationNotSupported
}

func (r safeFileRepository) Parent(u fyne.URI) (fyne.URI, error) {
	if h, ok := r.Repository.(repository.HierarchicalRepository); ok {
		return h.Parent(u)
	}
	return repository.GenericParent(u)
}

func (r safeFileRepository) Child(u fyne.URI, name string) (fyne.URI, error) {
	if h, ok := r.Repository.(repository.HierarchicalRepository); ok {
		return h.Child(u, name)
	}
	return repository.GenericChild(u, name)
}

func (r safeFileRepository) Copy(src, dst fyne.URI) error {
	if c, ok := r.Repository.(repository.CopyableRepository); ok {
		return c.Copy(src, dst)
	}
	return repository.GenericCopy(src, dst)
}

func (r safeFileRepository) Move(src, dst fyne.URI) error {
	if m, ok := r.Repository.(repository.MovableRepository); ok {
		return m.Move(src, dst)
	}
	return repository.GenericMove(src, dst)
}
