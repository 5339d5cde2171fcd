package cases

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
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
		}
	}()
	bw := bufio.NewWriterSize(f, 64<<10)
	if err = write(bw); err != nil {
		return err
	}
	if err = bw.Flush(); err != nil {
		return err
	}
	if err = f.Sync(); err != nil {
		return err
	}
	if err = f.Chmod(0o644); err != nil {
		return err
	}
	if err = f.Close(); err != nil {
		return err
	}
	return os.Rename(tmp, filepath.Join(dir, name))
}

// chkPrinter writes formatted text and keeps the first error.
type chkPrinter struct {
	w   io.Writer
	err error
}

func (p *chkPrinter) printf(format string, a ...any) {
	if p.err == nil {
		_, p.err = fmt.Fprintf(p.w, format, a...)
	}
}

// table returns a tabwriter on p's writer; flush it with p.flush.
func (p *chkPrinter) table() *tabwriter.Writer {
	return tabwriter.NewWriter(chkWriter{p}, 0, 0, 2, ' ', 0)
}

func (p *chkPrinter) flush(tw *tabwriter.Writer) {
	if err := tw.Flush(); err != nil && p.err == nil {
		p.err = err
	}
}

type chkWriter struct{ p *chkPrinter }

func (cw chkWriter) Write(b []byte) (int, error) {
	if cw.p.err != nil {
		return 0, cw.p.err
	}
	n, err := cw.p.w.Write(b)
	cw.p.err = err
	return n, err
}
