package testkit

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"testing"
	"time"
)

// SeedFiles adds every file matching the globs to f.
func SeedFiles(f *testing.F, globs ...string) {
	for _, g := range globs {
		files, _ := filepath.Glob(g)
		for _, p := range files {
			if data, err := os.ReadFile(p); err == nil {
				f.Add(data)
			}
		}
	}
}

// LineCount returns the number of lines of data (a last line without a
// newline counts; an empty text has one line).
func LineCount(data []byte) int { return bytes.Count(data, []byte("\n")) + 1 }

// HangLimit is the wall time one fuzz input may take before the Watchdog
// declares a hang. Go's fuzzing engine has no limit of its own: a hung
// worker just stops the count of inputs without a report.
const HangLimit = 10 * time.Second

// Watchdog crashes the test binary, with every goroutine's stack on stderr,
// when the input has not been handled within limit; the fuzzing engine then
// keeps the input in testdata/fuzz. Call the returned function when done.
func Watchdog(limit time.Duration, input []byte) (stop func()) {
	tm := time.AfterFunc(limit, func() {
		buf := make([]byte, 1<<20)
		buf = buf[:runtime.Stack(buf, true)]
		os.Stderr.Write(buf)
		panic(fmt.Sprintf("hang: input of %d bytes not handled within %v: %q", len(input), limit, input))
	})
	return func() { tm.Stop() }
}
