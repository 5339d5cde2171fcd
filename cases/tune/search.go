package tune

import (
	"context"
	"cureslab/cases/uncertain"
	"math"
	"math/rand/v2"
	"slices"
	"sync"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"
	"gonum.org/v1/gonum/stat/distmv"
	"gonum.org/v1/gonum/stat/samplemv"
)

// run carries out the method of Tune.
func (t *tuner) run(ctx context.Context) (*Result, error) {
	t.ctx = ctx
	t.progress = &uncertain.Progress{W: t.opt.Progress, What: "candidates"}
	defer t.progress.Finish()
	k := len(t.vars)
	res := t.res

	// The case's own program.
	res.Own = t.evaluate(nil, phaseCase, [3]int{0, 0, 0})

	// 1. Starts.
	own := make([]float64, k)
	for j, fv := range t.vars {
		own[j] = min(max(fv.own, 0), 1)
	}
	m := 8 + 4*k
	starts := [][]float64{own}
	u := mat.NewDense(m, k, nil)
	samplemv.LatinHypercube{Q: distmv.NewUnitUniform(k, nil), Src: rand.NewPCG(t.opt.Seed, 1)}.Sample(u)
	for i := range m {
		starts = append(starts, slices.Clone(u.RawRowView(i)))
	}
	cands := make([]*Candidate, len(starts))
	var wg sync.WaitGroup
	for i, x := range starts {
		wg.Add(1)
		go func() {
			defer wg.Done()
			cands[i] = t.evaluate(x, phaseStart, [3]int{1, 0, i})
		}()
	}
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return t.finish(), err
	}

	// 2. Nelder–Mead from the best distinct starts.
	order := slices.Clone(cands)
	slices.SortStableFunc(order, func(a, b *Candidate) int { return compareFloat(a.f, b.f) })
	var picked []*Candidate
	for _, c := range order {
		if len(picked) == t.opt.Starts {
			break
		}
		if !slices.ContainsFunc(picked, func(p *Candidate) bool { return p == c }) {
			picked = append(picked, c)
		}
	}
	for s, c := range picked {
		wg.Add(1)
		go func() {
			defer wg.Done()
			t.search(c, s+1)
		}()
	}
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return t.finish(), err
	}

	// 3. Polish.
	if b := t.bestFeasible(); b != nil {
		t.polish(b)
	}
	return t.finish(), ctx.Err()
}

// compareFloat orders a and b as cmp.Compare does, but a NaN compares equal
// to everything.
func compareFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// search runs Nelder–Mead from the candidate start; s numbers the search.
func (t *tuner) search(start *Candidate, s int) {
	k := len(t.vars)
	y0 := make([]float64, k)
	for j, x := range start.x {
		y0[j] = math.Acos(1 - 2*x)
	}
	seq := 0
	x := make([]float64, k)
	p := optimize.Problem{Func: func(y []float64) float64 {
		if t.ctx.Err() != nil {
			return invalidObjective
		}
		for j := range y {
			x[j] = (1 - math.Cos(y[j])) / 2
		}
		seq++
		return t.evaluate(x, phaseSearch, [3]int{2, s, seq}).f
	}}
	set := &optimize.Settings{
		FuncEvaluations: t.opt.Budget,
		InitValues:      &optimize.Location{F: start.f},
		Converger:       &optimize.FunctionConverge{Absolute: 1e-5, Iterations: 10 * k},
	}
	// An error here is a budget or convergence stop, or cancellation: the
	// candidates evaluated so far are what counts.
	optimize.Minimize(p, y0, set, &optimize.NelderMead{SimplexSize: 0.3})
}

// bestFeasible returns the shortest feasible candidate so far, ties to the
// earliest.
func (t *tuner) bestFeasible() *Candidate {
	var best *Candidate
	for _, c := range t.sorted() {
		if c.Feasible && c.x != nil && (best == nil || c.Cycle < best.Cycle) {
			best = c
		}
	}
	return best
}

// sorted returns every candidate in request order.
func (t *tuner) sorted() []*Candidate {
	t.mu.Lock()
	out := make([]*Candidate, 0, len(t.cache))
	for _, e := range t.cache {
		out = append(out, e.c)
	}
	t.mu.Unlock()
	slices.SortFunc(out, func(a, b *Candidate) int {
		switch {
		case orderLess(a.order, b.order):
			return -1
		case orderLess(b.order, a.order):
			return 1
		}
		return 0
	})
	return out
}

// polish moves one free value at a time from the feasible candidate b
// toward the end of its range that shortens the cycle (see Tune).
func (t *tuner) polish(b *Candidate) {
	x := slices.Clone(b.x)
	cur := b
	seq := 0
	eval := func(x []float64) *Candidate {
		seq++
		return t.evaluate(x, phasePolish, [3]int{3, 0, seq})
	}
	for pass := 0; pass < 3 && t.ctx.Err() == nil; pass++ {
		gained := false
		for j := range t.vars {
			lo, hi := slices.Clone(x), slices.Clone(x)
			lo[j], hi[j] = 0, 1
			cl, ch := t.cycleAt(lo), t.cycleAt(hi)
			end := -1.0
			switch {
			case cl < cur.Cycle && !(ch < cl):
				end = 0
			case ch < cur.Cycle:
				end = 1
			}
			if end < 0 || x[j] == end {
				continue
			}
			y := slices.Clone(x)
			y[j] = end
			if c := eval(y); c.Feasible && c.Cycle < cur.Cycle {
				x, cur, gained = y, c, true
				continue
			}
			a, bb := x[j], end
			for range 12 {
				if t.ctx.Err() != nil {
					break
				}
				mid := (a + bb) / 2
				y[j] = mid
				sm, _ := t.vars[j].sp.At(mid)
				sa, _ := t.vars[j].sp.At(a)
				sb, _ := t.vars[j].sp.At(bb)
				if sm == sa || sm == sb {
					break
				}
				if c := eval(y); c.Feasible && c.Cycle < cur.Cycle {
					a, cur, gained = mid, c, true
				} else {
					bb = mid
				}
			}
			x[j] = a
			x = slices.Clone(cur.x)
		}
		if !gained {
			break
		}
	}
}

// finish fills the result from the candidates evaluated.
func (t *tuner) finish() *Result {
	res := t.res
	res.Candidates = t.sorted()
	for i, c := range res.Candidates {
		c.Index = i
	}
	res.Runs = t.runs
	res.Best = t.bestFeasible()
	if res.Best == nil {
		for _, c := range res.Candidates {
			if c.x != nil && (res.Closest == nil || c.f < res.Closest.f) {
				res.Closest = c
			}
		}
		return res
	}
	b := res.Best
	res.Active = b.worst <= activeWithin
	res.Limiting = []string{b.Critical.Name}
	if res.Active {
		for _, m := range b.Criteria {
			if m.norm <= activeWithin && m.Name != b.Critical.Name {
				res.Limiting = append(res.Limiting, m.Name)
			}
		}
	}
	for j, fv := range t.vars {
		lo, hi := slices.Clone(b.x), slices.Clone(b.x)
		lo[j], hi[j] = 0, 1
		if b.Values[j] == fv.From && t.cycleAt(hi) > b.Cycle || b.Values[j] == fv.To && t.cycleAt(lo) > b.Cycle {
			res.AtBound = append(res.AtBound, fv.Key)
		}
	}
	res.Block = t.block(b)
	return res
}
