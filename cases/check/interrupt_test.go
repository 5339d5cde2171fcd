package check_test

import (
	"bytes"
	"context"
	"cureslab/cases/check"
	"cureslab/cases/internal/testkit"
	"errors"
	"strings"
	"testing"
)

// Ctrl-C stops the account part-way, at each of its checks in turn: the
// context's error, and the account left without its cautions (it is
// incomplete, and the command says so).
func TestCheckInterrupted(t *testing.T) {
	c := testkit.HandBuiltCase(t)
	count := testkit.NewStopAfter(-1)
	var whole bytes.Buffer
	if err := check.CheckContext(count, &whole, c); err != nil {
		t.Fatal(err)
	}
	if count.Checks() < 3 {
		t.Errorf("%d checks of the context, want at least 3", count.Checks())
	}
	for n := range count.Checks() {
		var b bytes.Buffer
		err := check.CheckContext(testkit.NewStopAfter(n), &b, c)
		if !errors.Is(err, context.Canceled) || strings.Contains(b.String(), "\nCautions\n") || b.Len() >= whole.Len() {
			t.Errorf("stopped at check %d: %v, %d of %d bytes written", n+1, err, b.Len(), whole.Len())
		}
	}
}
