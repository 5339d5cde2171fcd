package testkit

import (
	"context"
	"sync/atomic"
)

// StopAfter is a context that says it is cancelled from its (n+1)-th check
// of Err on, and counts the checks: a Ctrl-C that arrives part-way through
// some work, at a point a test chooses. Its Done channel is never closed
// (it is that of context.Background), so only the work's own checks of Err
// see the cancellation. Safe for use by several goroutines.
type StopAfter struct {
	context.Context
	n     int64
	calls atomic.Int64
}

// NewStopAfter returns a StopAfter that lets n checks pass; a negative n is
// never cancelled.
func NewStopAfter(n int64) *StopAfter {
	return &StopAfter{Context: context.Background(), n: n}
}

// Err returns context.Canceled once n checks have passed, else nil.
func (c *StopAfter) Err() error {
	if k := c.calls.Add(1); c.n >= 0 && k > c.n {
		return context.Canceled
	}
	return nil
}

// Checks returns how many times Err was called.
func (c *StopAfter) Checks() int64 { return c.calls.Load() }
