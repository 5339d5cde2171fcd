// Package limits holds the input limits the tool checks before it reads
// far: input files must be regular files of bounded size, read in chunks
// that a cancelled context stops; TOML text must not nest deeper than
// MaxNesting (checked before the text reaches the TOML library, whose cost
// grows faster than the depth); names and titles must not hold control or
// bidirectional-override characters, which would reach CSV files, HTML
// pages and terminals raw.
package limits

import (
	"context"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"syscall"
	"unicode/utf8"
)

// Limits of the inputs.
const (
	// MaxFileSize is the largest case file, or file a case names, in
	// bytes (16 MB): a case file is a few kilobytes, a table of material
	// data a few hundred.
	MaxFileSize = 16 << 20
	// MaxNesting is the deepest nesting of tables, arrays and dotted keys
	// in a TOML file: a case file needs about 6.
	MaxNesting = 32
	// chunk is the size of one read between two checks of the context.
	chunk = 256 << 10
)

// ErrNotRegular is wrapped by ReadFile's error for a path that is not a
// regular file (a FIFO, a device, a socket, a directory).
var ErrNotRegular = errors.New("not a regular file")

// ErrTooLarge is wrapped by ReadFile's error for a file above the limit.
var ErrTooLarge = errors.New("file too large")

// ReadFile reads the regular file at path, of at most max bytes.
//
// Method: the path is checked with Stat before it is opened (opening a
// FIFO would wait for a writer; reading a device such as /dev/zero would
// never end), opened without blocking, checked again on the open file, and
// read in chunks of 256 kB with ctx checked before each; a file that grows
// past max while it is read is refused too.
//
// Errors: ErrNotRegular or ErrTooLarge wrapped with what the path is or how
// large it is; ctx.Err() when cancelled; the file system's errors.
func ReadFile(ctx context.Context, path string, max int64) ([]byte, error) {
	f, fi, err := open(path, max)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	buf := make([]byte, 0, min(fi.Size(), max)+1)
	for {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		if len(buf) == cap(buf) {
			buf = append(buf, 0)[:len(buf)]
		}
		want := min(cap(buf)-len(buf), chunk)
		n, err := f.Read(buf[len(buf) : len(buf)+want])
		buf = buf[:len(buf)+n]
		if int64(len(buf)) > max {
			return nil, fmt.Errorf("%w: it grew past %s while being read (the limit is %s)", ErrTooLarge, Size(int64(len(buf))), Size(max))
		}
		if errors.Is(err, io.EOF) {
			return buf, nil
		}
		if err != nil {
			return nil, err
		}
	}
}

// Open opens the regular file at path, of at most max bytes, for reading
// as a stream (under Reader, to stop at a cancelled context): checked as
// ReadFile checks it, before it is opened and on the open file, so that a
// FIFO or a device is refused at once instead of blocking or never ending.
// Errors: as ReadFile's, ErrNotRegular or ErrTooLarge wrapped with what
// the path is or how large it is.
func Open(path string, max int64) (*os.File, error) {
	f, _, err := open(path, max)
	return f, err
}

func open(path string, max int64) (*os.File, fs.FileInfo, error) {
	fi, err := os.Stat(path)
	if err != nil {
		return nil, nil, err
	}
	if err := regular(fi, max); err != nil {
		return nil, nil, err
	}
	f, err := os.OpenFile(path, os.O_RDONLY|syscall.O_NONBLOCK, 0)
	if err != nil {
		return nil, nil, err
	}
	if fi, err = f.Stat(); err == nil {
		err = regular(fi, max)
	}
	if err != nil {
		f.Close()
		return nil, nil, err
	}
	return f, fi, nil
}

// checkFile returns why the file at path cannot be read as an input of at
// most max bytes (see ReadFile), or nil; it does not open the file.
func checkFile(path string, max int64) error {
	fi, err := os.Stat(path)
	if err != nil {
		return err
	}
	return regular(fi, max)
}

func regular(fi fs.FileInfo, max int64) error {
	m := fi.Mode()
	if !m.IsRegular() {
		what := "a special file"
		switch {
		case m.IsDir():
			what = "a directory"
		case m&fs.ModeNamedPipe != 0:
			what = "a named pipe (FIFO)"
		case m&fs.ModeCharDevice != 0:
			what = "a character device"
		case m&fs.ModeDevice != 0:
			what = "a device"
		case m&fs.ModeSocket != 0:
			what = "a socket"
		}
		return fmt.Errorf("%w: it is %s; give a file", ErrNotRegular, what)
	}
	if fi.Size() > max {
		return fmt.Errorf("%w: %s, the limit is %s", ErrTooLarge, Size(fi.Size()), Size(max))
	}
	return nil
}

// Size formats a byte count for messages: "16 MB", "1.5 GB", "812 bytes"
// (decimal prefixes of powers of 1024, as file managers show them).
func Size(n int64) string {
	switch {
	case n >= 1<<30:
		return trim(float64(n)/(1<<30)) + " GB"
	case n >= 1<<20:
		return trim(float64(n)/(1<<20)) + " MB"
	case n >= 1<<10:
		return trim(float64(n)/(1<<10)) + " kB"
	}
	return fmt.Sprintf("%d bytes", n)
}

func trim(x float64) string {
	if x >= 100 {
		return fmt.Sprintf("%.0f", x)
	}
	s := fmt.Sprintf("%.1f", x)
	if len(s) > 2 && s[len(s)-2:] == ".0" {
		s = s[:len(s)-2]
	}
	return s
}

// BadChar is a character refused in a name or title.
type BadChar struct {
	Pos  int  // 1-based position of the character (not the byte)
	Rune rune // utf8.RuneError for bytes that are not UTF-8
	What string
}

func (b BadChar) String() string {
	if b.Rune == utf8.RuneError {
		return fmt.Sprintf("a byte that is not UTF-8 at character %d", b.Pos)
	}
	return fmt.Sprintf("%s (U+%04X) at character %d", b.What, b.Rune, b.Pos)
}

// CheckText returns the first character of s refused in a name or a title,
// and false when there is none: a control character (C0, DEL, C1, tab and
// newlines included), a bidirectional embedding, override, isolate or mark
// (U+200E, U+200F, U+061C, U+202A–U+202E, U+2066–U+2069), the byte-order
// mark or a line or paragraph separator, or invalid UTF-8.
func CheckText(s string) (BadChar, bool) {
	pos := 0
	for i, r := range s {
		pos++
		if r == utf8.RuneError {
			if _, size := utf8.DecodeRuneInString(s[i:]); size <= 1 {
				return BadChar{Pos: pos, Rune: r}, true
			}
		}
		if what := refused(r); what != "" {
			return BadChar{Pos: pos, Rune: r, What: what}, true
		}
	}
	return BadChar{}, false
}

func refused(r rune) string {
	switch {
	case r < 0x20 || r == 0x7f || r >= 0x80 && r < 0xa0:
		return "a control character"
	case r == 0x200e || r == 0x200f || r == 0x061c || r >= 0x202a && r <= 0x202e || r >= 0x2066 && r <= 0x2069:
		return "a bidirectional control character"
	case r == 0xfeff:
		return "a byte-order mark"
	case r == 0x2028 || r == 0x2029:
		return "a line or paragraph separator"
	}
	return ""
}

// Reader returns a reader of r that fails with ctx.Err() once ctx is done,
// checked before each read. Under a buffered reader (bufio, encoding/csv)
// it stops a long read within one buffer's worth of bytes, as ReadFile
// does between its chunks, without holding the whole file in memory.
func Reader(ctx context.Context, r io.Reader) io.Reader { return &ctxReader{ctx, r} }

type ctxReader struct {
	ctx context.Context
	r   io.Reader
}

func (c *ctxReader) Read(p []byte) (int, error) {
	if err := c.ctx.Err(); err != nil {
		return 0, err
	}
	return c.r.Read(p)
}
