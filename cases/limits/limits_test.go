package limits

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestReadFile(t *testing.T) {
	dir := t.TempDir()
	ok := filepath.Join(dir, "case.toml")
	text := strings.Repeat("# a comment line of a case file\n", 20000) // 640 kB: several chunks
	os.WriteFile(ok, []byte(text), 0o644)
	got, err := ReadFile(context.Background(), ok, MaxFileSize)
	if err != nil || string(got) != text {
		t.Fatalf("a plain file: %d bytes, %v", len(got), err)
	}
	big := filepath.Join(dir, "big.toml")
	f, _ := os.Create(big)
	f.Truncate(MaxFileSize + 1) // sparse: nothing written
	f.Close()
	if _, err := ReadFile(context.Background(), big, MaxFileSize); !errors.Is(err, ErrTooLarge) || !strings.Contains(err.Error(), "16 MB") {
		t.Errorf("a file of 16 MB + 1 byte: %v", err)
	}
	if _, err := ReadFile(context.Background(), dir, MaxFileSize); !errors.Is(err, ErrNotRegular) || !strings.Contains(err.Error(), "a directory") {
		t.Errorf("a directory: %v", err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := ReadFile(ctx, ok, MaxFileSize); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}
}

func TestReadFileRefusesDevice(t *testing.T) {
	if _, err := os.Stat("/dev/zero"); err != nil {
		t.Skip("no /dev/zero on this system")
	}
	if _, err := ReadFile(context.Background(), "/dev/zero", MaxFileSize); !errors.Is(err, ErrNotRegular) || !strings.Contains(err.Error(), "character device") {
		t.Errorf("/dev/zero: %v", err)
	}
	link := filepath.Join(t.TempDir(), "case.toml")
	if err := os.Symlink("/dev/zero", link); err == nil {
		if _, err := ReadFile(context.Background(), link, MaxFileSize); !errors.Is(err, ErrNotRegular) {
			t.Errorf("a link to /dev/zero: %v", err)
		}
	}
}

func TestCheckText(t *testing.T) {
	for _, tc := range []struct {
		s    string
		bad  bool
		pos  int
		what string
	}{
		{"Thick potting, 10 mm — oven", false, 0, ""},
		{"épaisseur 10 mm", false, 0, ""},
		{"a\x00b", true, 2, "control"},
		{"ab\x1b[31m", true, 3, "control"},
		{"tab\there", true, 4, "control"},
		{"é\u202egnp.exe", true, 2, "bidirectional"},
		{"x\u2066y", true, 2, "bidirectional"},
		{"x\u0085", true, 2, "control"},
		{"ab\xff", true, 3, "UTF-8"},
	} {
		b, bad := CheckText(tc.s)
		if bad != tc.bad || bad && (b.Pos != tc.pos || !strings.Contains(b.String(), tc.what)) {
			t.Errorf("%q: %v %v (%s); want bad=%v at %d, %q", tc.s, bad, b.Pos, b, tc.bad, tc.pos, tc.what)
		}
	}
}

func TestSize(t *testing.T) {
	for n, want := range map[int64]string{812: "812 bytes", 16 << 20: "16 MB", 3 << 29: "1.5 GB", 280 << 30: "280 GB", 1536: "1.5 kB"} {
		if got := Size(n); got != want {
			t.Errorf("Size(%d) = %q, want %q", n, got, want)
		}
	}
}
