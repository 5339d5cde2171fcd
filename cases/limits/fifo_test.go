//go:build unix

package limits

import (
	"context"
	"errors"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// A named pipe is refused at once: opening it would wait for a writer.
func TestReadFileRefusesFIFO(t *testing.T) {
	p := filepath.Join(t.TempDir(), "case.toml")
	if err := syscall.Mkfifo(p, 0o644); err != nil {
		t.Skip("cannot make a FIFO here:", err)
	}
	if _, err := ReadFile(context.Background(), p, MaxFileSize); !errors.Is(err, ErrNotRegular) || !strings.Contains(err.Error(), "named pipe") {
		t.Errorf("a FIFO: %v", err)
	}
}
