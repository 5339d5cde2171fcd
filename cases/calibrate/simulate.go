package calibrate

import (
	"context"
	"fmt"
	"math"
	"slices"
	"strconv"
	"sync"

	"cureslab/solver"
)

// simulate runs p summary-only with probes at the log's depths and output
// times at the log's times, and returns the simulated temperatures sim[k][i]
// of probe k at time i (K).
//
// Alignment: the solver lands exactly on every output time (its step
// control ends a step there), so a simulated reading is the solution at the
// log's time itself, not an interpolation between outputs; a time of 0 is
// the initial state. A run that stops early (runaway, numerical failure)
// leaves NaN from where it stopped.
//
// Cost: one solver run, with at least one step per log time.
func simulate(ctx context.Context, ws *solver.Workspace, p *solver.Problem, l *Log) ([][]float64, *solver.Result, error) {
	q := *p
	q.NoFields = true
	q.Probes = make([]float64, len(l.Probes))
	for k, pr := range l.Probes {
		q.Probes[k] = pr.Depth
	}
	q.OutputTimes = nil
	for _, t := range l.Times {
		if t > 0 && t < q.End {
			q.OutputTimes = append(q.OutputTimes, t)
		}
	}
	if q.OutputTimes == nil {
		q.OutputTimes = []float64{} // not nil: nil asks for the default spacing
	}
	res, err := ws.Run(ctx, &q)
	if err != nil {
		return nil, nil, err
	}
	sim := make([][]float64, len(l.Probes))
	for k := range sim {
		sim[k] = make([]float64, len(l.Times))
		for i := range sim[k] {
			sim[k][i] = math.NaN()
		}
	}
	// The snapshots are t = 0, then the output times in order (End last),
	// up to where the run stopped; an early stop adds one at its moment.
	j := 0
	for i, t := range l.Times {
		for j < len(res.Snapshots) && res.Snapshots[j].Time < t {
			j++
		}
		if j == len(res.Snapshots) {
			break
		}
		s := &res.Snapshots[j]
		if s.Time != t {
			continue
		}
		if res.Status != solver.OK && j == len(res.Snapshots)-1 && t != q.End {
			break // the moment of an early stop, not an output time
		}
		for k := range sim {
			sim[k][i] = s.ProbeT[k]
		}
	}
	return sim, res, nil
}

// simCache keeps the simulated traces of the latest evaluations by their
// free values, so that the best point's traces need no extra run.
type simCache struct {
	mu    sync.Mutex
	size  int
	keys  []string
	table map[string][][]float64
}

func newSimCache(size int) *simCache {
	return &simCache{size: size, table: make(map[string][][]float64)}
}

func cacheKey(vals []float64) string {
	b := make([]byte, 0, 17*len(vals))
	for _, v := range vals {
		b = strconv.AppendUint(b, math.Float64bits(v), 16)
		b = append(b, ',')
	}
	return string(b)
}

func (c *simCache) put(vals []float64, sim [][]float64) {
	k := cacheKey(vals)
	c.mu.Lock()
	defer c.mu.Unlock()
	if _, ok := c.table[k]; !ok {
		c.keys = append(c.keys, k)
	}
	c.table[k] = sim
	for len(c.keys) > c.size {
		delete(c.table, c.keys[0])
		c.keys = slices.Delete(c.keys, 0, 1)
	}
}

func (c *simCache) get(vals []float64) ([][]float64, bool) {
	c.mu.Lock()
	defer c.mu.Unlock()
	s, ok := c.table[cacheKey(vals)]
	return s, ok
}

// runError says why a run at some free values gave no residuals.
type runError struct {
	vals []float64
	msg  string
}

func (e *runError) Error() string { return fmt.Sprintf("at %v: %s", e.vals, e.msg) }
