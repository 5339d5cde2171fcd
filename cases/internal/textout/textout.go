package textout

import (
	"bufio"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"text/tabwriter"
)

// WriteFileAtomic writes the file dir/name through write, so that the file
// is either replaced whole or left as it was.
//
// Method: write goes to a buffered temporary file created in dir (so the
// rename cannot cross file systems); after write returns nil the buffer is
// flushed, the file synced to disk, closed, given mode 0644 and renamed over
// dir/name. On any error, from write or from the file system, the temporary
// file is removed and an existing dir/name is left untouched.
//
// Preconditions: dir exists. write must not keep the writer after it
// returns.
func WriteFileAtomic(dir, name string, write func(io.Writer) error) (err error) {
	f, err := os.CreateTemp(dir, "."+name+".tmp*")
	if err != nil {
		return err
	}
	tmp := f.Name()
	if err := WriteSynced(f, write); err != nil {
		os.Remove(tmp)
		return err
	}
	return os.Rename(tmp, filepath.Join(dir, name))
}

// WriteSynced writes the new file f through write (buffered), flushes it,
// syncs it to disk, gives it mode 0644 and closes it. On error f is closed
// and the error returned; removing the file is the caller's. write must
// not keep the writer after it returns.
func WriteSynced(f *os.File, write func(io.Writer) error) error {
	bw := bufio.NewWriterSize(f, 64<<10)
	err := write(bw)
	if err == nil {
		err = bw.Flush()
	}
	if err == nil {
		err = f.Sync()
	}
	if err == nil {
		err = f.Chmod(0o644)
	}
	if err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// Printer writes formatted text and keeps the first error.
type Printer struct {
	W   io.Writer
	Err error
}

func (p *Printer) Printf(format string, a ...any) {
	if p.Err == nil {
		_, p.Err = fmt.Fprintf(p.W, format, a...)
	}
}

// Table returns a tabwriter on p's writer; flush it with p.flush.
func (p *Printer) Table() *tabwriter.Writer {
	return tabwriter.NewWriter(Writer{p}, 0, 0, 2, ' ', 0)
}

func (p *Printer) Flush(tw *tabwriter.Writer) {
	if err := tw.Flush(); err != nil && p.Err == nil {
		p.Err = err
	}
}

type Writer struct{ p *Printer }

func (cw Writer) Write(b []byte) (int, error) {
	if cw.p.Err != nil {
		return 0, cw.p.Err
	}
	n, err := cw.p.W.Write(b)
	cw.p.Err = err
	return n, err
}
