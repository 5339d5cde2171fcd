package tune

import (
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/results"
	"cureslab/cases/uncertain"
	"cureslab/solver"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"sync"
)

// evaluate returns the candidate with the free values at x (nil x: the
// case's own program), evaluating it once; order is its request order.
func (t *tuner) evaluate(x []float64, phase string, order [3]int) *Candidate {
	var shown []string
	var vals []any
	if x != nil {
		shown, vals = t.shown(x)
	} else { // the case's own program, as written
		shown = make([]string, len(t.vars))
		for j, fv := range t.vars {
			shown[j] = fv.Case
		}
	}
	key := strings.Join(shown, "\x1f")
	t.mu.Lock()
	e, ok := t.cache[key]
	if ok {
		if orderLess(order, e.c.order) {
			e.c.order, e.c.Phase = order, phase
		}
		t.mu.Unlock()
		<-e.done
		return e.c
	}
	c := &Candidate{Phase: phase, order: order, Values: shown}
	if x == nil {
		x = t.ownX()
	}
	if x != nil {
		c.x = slices.Clone(x)
		for j := range c.x {
			c.x[j] = min(max(c.x[j], 0), 1)
		}
	}
	e = &cacheEntry{done: make(chan struct{}), c: c}
	t.cache[key] = e
	t.mu.Unlock()
	t.run1(c, vals)
	t.mu.Lock()
	t.runs += c.Runs
	if c.Feasible && (t.best == 0 || c.Cycle < t.best) {
		t.best = c.Cycle
	}
	extra := fmt.Sprintf(" (%d runs)", t.runs)
	if t.best > 0 {
		extra += ", best feasible cycle " + num.HumanTime(t.best)
	}
	t.mu.Unlock()
	t.progress.AddWith(1, extra)
	close(e.done)
	return c
}

// ownX returns the case's own values as fractions of the ranges when they
// are inside them and written exactly as a candidate there would be, else
// nil.
func (t *tuner) ownX() []float64 {
	x := make([]float64, len(t.vars))
	for j, fv := range t.vars {
		if !(fv.own >= 0 && fv.own <= 1) {
			return nil
		}
		x[j] = fv.own
	}
	shown, _ := t.shown(x)
	for j, fv := range t.vars {
		if shown[j] != fv.Case {
			return nil
		}
	}
	return x
}

func orderLess(a, b [3]int) bool {
	for i := range a {
		if a[i] != b[i] {
			return a[i] < b[i]
		}
	}
	return false
}

// caseFor parses the candidate tree, setting time.end when the case sets
// it; it returns the case, its tree and the cycle.
func (t *tuner) caseFor(vals []any) (*cases.Case, map[string]any, float64, error) {
	tr := t.tree(vals)
	c, err := t.v.Parse(tr)
	if err != nil {
		return nil, nil, math.NaN(), err
	}
	s := c.Schedules[t.prog]
	cyc := s.End()
	if t.endSet && vals != nil {
		tr = t.tree(vals)
		cases.SetPath(tr, []string{"time", "end"}, strconv.FormatFloat(cyc+t.offset, 'g', -1, 64)+" s")
		if c, err = t.v.Parse(tr); err != nil {
			return nil, nil, cyc, err
		}
	}
	return c, tr, cyc, nil
}

// run1 evaluates candidate c with the free values vals: the case at every
// sample point of [uncertainty] (once without it), then the aggregate.
func (t *tuner) run1(c *Candidate, vals []any) {
	cs, tr, cyc, err := t.caseFor(vals)
	c.Cycle = cyc
	if err != nil {
		c.Cycle, c.Err, c.Status, c.f = math.NaN(), cases.FlattenErrors(err), results.StatusFailed, invalidObjective
		c.worst = badMargin
		c.Criteria = t.emptyMargins()
		return
	}
	c.End = cs.Problem.End
	t.aggregate(c, t.runPoints(cs, tr))
}

// pointRun is the outcome of one run of a candidate.
type pointRun struct {
	norm   []float64 // normalised margins
	margin []float64 // margins in summary units
	status string
	err    string
}

// runPoints runs the case cs (decoded as tr) at every sample point, or once
// without [uncertainty], at most cap(t.sem) runs at a time.
func (t *tuner) runPoints(cs *cases.Case, tr map[string]any) []pointRun {
	outs := make([]pointRun, max(1, len(t.pts)))
	var wg sync.WaitGroup
	for i := range outs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			t.sem <- struct{}{}
			defer func() { <-t.sem }()
			outs[i] = t.runPoint(cs, tr, i)
		}()
	}
	wg.Wait()
	return outs
}

// runPoint runs the case cs, moved to sample point i when there are sample
// points, and judges it on its summary alone.
func (t *tuner) runPoint(cs *cases.Case, tr map[string]any, i int) pointRun {
	sc := cs
	if t.pts != nil {
		st := cases.CloneTree(tr).(map[string]any)
		if _, err := uncertain.Sample(t.unc, st, t.pts[i]); err != nil {
			return pointRun{status: results.StatusFailed, err: err.Error()}
		}
		var err error
		if sc, err = t.v.Parse(st); err != nil {
			return pointRun{status: results.StatusFailed, err: cases.FlattenErrors(err)}
		}
	}
	sc.Problem.NoFields = true // judged on the summary alone
	r, err := solver.Run(t.ctx, sc.Problem)
	if err != nil {
		return pointRun{status: results.StatusFailed, err: err.Error()}
	}
	o := pointRun{status: results.StatusOf(r, results.Judge(sc, r))}
	if r.Err != nil {
		o.err = r.Err.Error()
	}
	o.norm, o.margin = t.margins(sc, r)
	return o
}

// aggregate sets the outcome of candidate c from its runs: the need-th best
// margin of each criterion and of the worst margin per run, the share of
// runs that met every criterion, the worst status, and the objective (cycle
// time plus the squared shortfalls).
func (t *tuner) aggregate(c *Candidate, outs []pointRun) {
	n := len(outs)
	c.Runs = n
	k := n - t.need // 0-based index in ascending order
	worst := make([]float64, n)
	met := 0
	rank := map[string]int{results.StatusOK: 0, results.StatusCriteriaFailed: 1, results.StatusRunaway: 2, results.StatusFailed: 3}
	c.Status = results.StatusOK
	for i, o := range outs {
		if o.norm == nil {
			o.norm = make([]float64, len(t.crit))
			o.margin = make([]float64, len(t.crit))
			for j := range o.norm {
				o.norm[j], o.margin[j] = badMargin, math.Inf(-1)
			}
			outs[i] = o
		}
		worst[i] = math.Inf(1)
		for _, m := range o.norm {
			worst[i] = min(worst[i], m)
		}
		if o.status == results.StatusOK {
			met++ // every verdict passed: every margin is ≥ 0
		} else {
			worst[i] = min(worst[i], -1e-9)
		}
		if rank[o.status] > rank[c.Status] {
			c.Status = o.status
		}
		if c.Err == "" && o.err != "" {
			c.Err = o.err
		}
	}
	c.ShareMet = float64(met) / float64(n)
	c.Feasible = met >= t.need
	idx := make([]int, n)
	for i := range idx {
		idx[i] = i
	}
	slices.SortStableFunc(idx, func(a, b int) int { return compareFloat(worst[a], worst[b]) })
	c.worst = max(worst[idx[k]], badMargin)
	crit := outs[idx[k]]
	jc := 0
	for j := range crit.norm {
		if crit.norm[j] < crit.norm[jc] {
			jc = j
		}
	}
	c.Critical = t.crit[jc]
	c.Critical.Margin, c.Critical.norm = crit.margin[jc], crit.norm[jc]
	c.Critical.Value = criterionValue(c.Critical)
	pen := 0.0
	c.Criteria = make([]Margin, len(t.crit))
	for j, m := range t.crit {
		ns, ms := make([]float64, n), make([]float64, n)
		for i, o := range outs {
			ns[i], ms[i] = o.norm[j], o.margin[j]
		}
		slices.Sort(ns)
		slices.Sort(ms)
		m.norm, m.Margin = max(ns[k], badMargin), ms[k]
		m.Value = criterionValue(m)
		c.Criteria[j] = m
		pen += sq(min(0, m.norm))
	}
	pen += sq(min(0, c.worst))
	c.f = c.Cycle/t.cRef + pen
}

func sq(x float64) float64 { return x * x }

// criterionValue returns the value of a criterion from its limit and
// margin; NaN when the run ran away or the quantity does not exist.
func criterionValue(m Margin) float64 {
	switch {
	case math.IsInf(m.Margin, 0):
		return math.NaN()
	case m.Name == results.CriterionMinCure:
		return m.Limit + m.Margin
	}
	return m.Limit - m.Margin
}

func (t *tuner) emptyMargins() []Margin {
	out := make([]Margin, len(t.crit))
	for j, m := range t.crit {
		m.Value, m.Margin, m.norm = math.NaN(), math.Inf(-1), badMargin
		out[j] = m
	}
	return out
}

// margins returns the margin of each criterion of the run r of c,
// normalised and in summary units; a run that ran away or failed gets
// badMargin on every criterion.
func (t *tuner) margins(c *cases.Case, r *solver.Result) (norm, margin []float64) {
	norm = make([]float64, len(t.crit))
	margin = make([]float64, len(t.crit))
	s := r.Summary
	for j, m := range t.crit {
		var v float64
		switch m.Name {
		case results.CriterionMinCure:
			v = s.MinFinalCure - t.limitSI[j]
		case results.CriterionMaxTemperature:
			v = t.limitSI[j] - s.PeakTemperature
		case results.CriterionMaxSpread:
			v = t.limitSI[j] - s.MaxSpread
		}
		if math.IsNaN(v) {
			v = math.Inf(1) // the quantity does not exist: the criterion holds
		}
		margin[j] = v
		norm[j] = v / criterionScale[m.Name]
		if r.Status != solver.OK {
			norm[j], margin[j] = badMargin, math.Inf(-1)
		}
	}
	return norm, margin
}

// cycleAt returns the program's end with the free values at x, without
// running it (NaN when the loader refuses the candidate).
func (t *tuner) cycleAt(x []float64) float64 {
	shown, vals := t.shown(x)
	key := strings.Join(shown, "\x1f")
	t.mu.Lock()
	if e, ok := t.cache[key]; ok {
		t.mu.Unlock()
		<-e.done
		return e.c.Cycle
	}
	if c, ok := t.cyc[key]; ok {
		t.mu.Unlock()
		return c
	}
	t.mu.Unlock()
	c, err := t.v.Parse(t.tree(vals))
	cyc := math.NaN()
	if err == nil {
		s := c.Schedules[t.prog]
		cyc = s.End()
	}
	t.mu.Lock()
	t.cyc[key] = cyc
	t.mu.Unlock()
	return cyc
}
