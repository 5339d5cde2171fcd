package report

import (
	"math"
	"slices"
)

// fieldTimesKept is the most output times on the even grid whose fields
// (temperature, degree of cure and absorbed power of every cell) the
// report of a run keeps to draw its maps and profiles (fieldColumns); the
// last output time, the hottest and the first with absorbed power are kept
// besides. A run with at most this many output times is drawn from all of
// them.
const fieldTimesKept = 512

// fieldCol is the fields of every cell at one output time, rounded as the
// output files hold them.
type fieldCol struct {
	k       int       // index of the output time
	T, Cure []float64 // °C; degree of cure, NaN in cells that do not cure
	P       []float64 // absorbed power, W/m³; nil without volumetric heating
	roles   uint8     // why it is kept (role*); 0: free for reuse
}

// Why a column is kept.
const (
	roleGrid  = 1 << iota // on the even grid
	roleLast              // the latest output time
	roleHot               // the hottest so far
	rolePower             // the first with absorbed power
)

// fieldColumns takes the fields of a run one output time after the other
// and keeps a bounded set of them, so that drawing the report of a run
// needs memory proportional to its cells, not to cells × output times.
//
// Rule: output time k is on the even grid when k is a multiple of the
// stride s; s starts at 1 and doubles whenever the grid would hold more
// than fieldTimesKept times (those off the new grid are dropped). So a run
// of N output times keeps every s-th one, s the smallest power of two with
// ⌈N/s⌉ ≤ fieldTimesKept (all of them up to fieldTimesKept), the first
// included, and besides: the last output time, the hottest (the highest
// cell temperature; the earliest on ties) and the first in which some cell
// absorbs power. The rule depends on the sequence of output times only, so
// the report drawn at the end of a run and the one redrawn from its files
// keep the same times.
//
// Over every output time, kept or not, it follows what needs all of them:
// the range of temperatures (the colour scale of the map), the hottest
// temperature and the least cure at each time (the comparison page), which
// cells ever cure, and each cell's gel time (newRunData).
//
// Cost: O(cells) per output time; memory O(cells × fieldTimesKept) plus
// O(output times) for the per-time values. Dropped columns are reused.
type fieldColumns struct {
	n      int
	power  bool
	stride int
	grid   []*fieldCol
	last   *fieldCol
	hot    *fieldCol
	hotT   float64
	power0 *fieldCol // the first with power
	free   []*fieldCol

	times          []float64 // every output time, s
	tLo, tHi       float64   // temperatures over every output time, °C
	hottest, least []float64 // per output time: hottest cell (°C), least cure (NaN without cure)
	cured          []bool    // per cell: has a cure value at some output time
	gel            []float64 // per cell: the gel point of its layer; NaN unknown
	gelTime        []float64 // per cell: the gel time, s; NaN while not gelled
	prev           []float64 // per cell: the cure at the previous output time
}

// newFieldColumns prepares for n cells, with an absorbed-power field when
// power is set; gel[i] is the gel point of cell i's layer (NaN unknown).
func newFieldColumns(n int, power bool, gel []float64) *fieldColumns {
	f := &fieldColumns{n: n, power: power, stride: 1, hotT: math.Inf(-1),
		tLo: math.Inf(1), tHi: math.Inf(-1),
		cured: make([]bool, n), gel: gel, gelTime: make([]float64, n), prev: make([]float64, n)}
	for i := range n {
		f.gelTime[i] = math.NaN()
	}
	return f
}

// column returns a column to fill with the fields of the next output time
// (its slices of length n, contents undefined).
func (f *fieldColumns) column() *fieldCol {
	if k := len(f.free); k > 0 {
		c := f.free[k-1]
		f.free = f.free[:k-1]
		return c
	}
	c := &fieldCol{T: make([]float64, f.n), Cure: make([]float64, f.n)}
	if f.power {
		c.P = make([]float64, f.n)
	}
	return c
}

// release takes role r from c, and frees c when it has none left.
func (f *fieldColumns) release(c *fieldCol, r uint8) {
	if c == nil {
		return
	}
	c.roles &^= r
	if c.roles == 0 {
		f.free = append(f.free, c)
	}
}

// add takes column c (from column, filled) as the fields at time t, the
// next output time.
func (f *fieldColumns) add(t float64, c *fieldCol) {
	k := len(f.times)
	c.k, c.roles = k, 0
	f.times = append(f.times, t)
	lo, hi := valueRange(c.T)
	f.tLo, f.tHi = min(f.tLo, lo), max(f.tHi, hi)
	f.hottest = append(f.hottest, hi)
	least, _ := valueRange(c.Cure)
	if math.IsInf(least, 1) {
		least = math.NaN()
	}
	f.least = append(f.least, least)
	for i, a := range c.Cure {
		if math.IsNaN(a) {
			continue
		}
		f.cured[i] = true
		g := f.gel[i]
		if !math.IsNaN(f.gelTime[i]) || !(a >= g) {
			continue
		}
		// Linear in time from the output time before, when it had not
		// gelled.
		tg := t
		if a0 := f.prev[i]; k > 0 && a0 < g && a > a0 {
			t0 := f.times[k-1]
			tg = t0 + (t-t0)*(g-a0)/(a-a0)
		}
		f.gelTime[i] = tg
	}
	copy(f.prev, c.Cure)

	c.roles = roleLast
	f.release(f.last, roleLast)
	f.last = c
	if hi > f.hotT {
		c.roles |= roleHot
		f.release(f.hot, roleHot)
		f.hot, f.hotT = c, hi
	}
	if f.power && f.power0 == nil {
		if _, h := valueRange(c.P); h > 0 {
			c.roles |= rolePower
			f.power0 = c
		}
	}
	if k%f.stride == 0 {
		c.roles |= roleGrid
		f.grid = append(f.grid, c)
		if len(f.grid) > fieldTimesKept {
			f.stride *= 2
			kept := f.grid[:0]
			for _, g := range f.grid {
				if g.k%f.stride == 0 {
					kept = append(kept, g)
				} else {
					f.release(g, roleGrid)
				}
			}
			clear(f.grid[len(kept):])
			f.grid = kept
		}
	}
}

// columns returns the kept columns in time order.
func (f *fieldColumns) columns() []*fieldCol {
	out := slices.Clone(f.grid)
	for _, c := range []*fieldCol{f.last, f.hot, f.power0} {
		if c != nil && !slices.Contains(out, c) {
			out = append(out, c)
		}
	}
	slices.SortFunc(out, func(a, b *fieldCol) int { return a.k - b.k })
	return out
}
