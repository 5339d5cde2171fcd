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

// Printer writes formatted text and keeps the first error: once a write
// has failed, it writes nothing more.
type Printer struct {
	w   io.Writer
	err error
}

// NewPrinter returns a Printer on w.
func NewPrinter(w io.Writer) *Printer { return &Printer{w: w} }

// Err returns the first error of a write, nil if none failed.
func (p *Printer) Err() error { return p.err }

// Printf writes fmt.Sprintf(format, a...).
func (p *Printer) Printf(format string, a ...any) {
	if p.err == nil {
		_, p.err = fmt.Fprintf(p.w, format, a...)
	}
}

// Table returns a tabwriter on p's writer (cells padded by 2 spaces);
// flush it with p.Flush.
func (p *Printer) Table() *tabwriter.Writer {
	return tabwriter.NewWriter(printerWriter{p}, 0, 0, 2, ' ', 0)
}

// Flush flushes tw, keeping its error.
func (p *Printer) Flush(tw *tabwriter.Writer) {
	if err := tw.Flush(); err != nil && p.err == nil {
		p.err = err
	}
}

// printerWriter writes to the writer of p unless a write has failed.
type printerWriter struct{ p *Printer }

func (cw printerWriter) Write(b []byte) (int, error) {
	if cw.p.err != nil {
		return 0, cw.p.err
	}
	n, err := cw.p.w.Write(b)
	cw.p.err = err
	return n, err
}
