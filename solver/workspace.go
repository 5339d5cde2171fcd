package solver

import "context"

// Workspace keeps the buffers of a run for the next one, so that a worker
// running many problems one after the other (a sweep) allocates its
// solver's arrays once instead of once per run. Problems of any size may
// follow each other; the buffers grow to the largest (about 60 floats per
// cell). The zero value is ready to use. A Workspace serves one run at a
// time: give each goroutine its own. The Result of a run never refers to
// the workspace's memory.
type Workspace struct {
	buf []float64
}

// Run is solver.Run with the workspace's buffers: the same results, bit for
// bit (each buffer starts at zero, as a fresh allocation would). Errors as
// for solver.Run. Cost: clearing the buffers, O(cells), on top of the run;
// the first run, and a run larger than any before it, allocates as
// solver.Run does and sizes the buffers for the next.
func (w *Workspace) Run(ctx context.Context, p *Problem) (*Result, error) {
	return w.RunStream(ctx, p, nil)
}

// RunStream is solver.RunStream with the workspace's buffers (see Run).
func (w *Workspace) RunStream(ctx context.Context, p *Problem, sink Sink) (*Result, error) {
	q, err := normalise(p)
	if err != nil {
		return nil, err
	}
	clear(w.buf)
	c := &carver{buf: w.buf}
	s := newStepper(q, c)
	if c.short > 0 {
		// Room for everything next time, in one block.
		w.buf = make([]float64, c.used+c.short)
	}
	return s.run(ctx, sink), nil
}

// carver hands out zeroed slices from one buffer and, when it runs out,
// fresh ones, counting what was missing. A nil carver always allocates.
type carver struct {
	buf         []float64
	used, short int
}

func (c *carver) take(m int) []float64 {
	if c == nil {
		return make([]float64, m)
	}
	if c.used+m > len(c.buf) {
		c.short += m
		return make([]float64, m)
	}
	s := c.buf[c.used : c.used+m : c.used+m]
	c.used += m
	return s
}
