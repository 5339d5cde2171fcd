package cases

import (
	"fmt"
)

// The modes of a sweep (README, Case file reference).
const (
	ModeGrid           = "grid"            // every combination of the varied values
	ModeLatinHypercube = "latin-hypercube" // samples drawn by Latin hypercube sampling
)

// Limits on the size of a sweep, so that a typo cannot ask for memory the
// machine does not have.
const (
	MaxGridRuns  = 10_000_000
	MaxLHSRuns   = 1_000_000
	MaxSweepKeys = 64
)

var (
	sweepKeys = []string{"mode", "samples", "seed", "vary"}
	varyKeys  = []string{"key", "values", "from", "to", "count"}
)

// Vary is one varied key of a sweep, from a [[sweep.vary]] table or a
// --vary option (ParseVary): either a list of Values, or a range From..To.
//
// Values, From and To are TOML values: a string (a quantity with its unit,
// "8 mm", or a name such as a schedule), an int64, a float64 or a bool.
// Count is the number of values of a range in grid mode (≥ 2, both ends
// included, linear); latin-hypercube draws from the whole range and ignores
// Count.
type Vary struct {
	Key      string
	Values   []any
	From, To any
	Count    int
}

// IsRange reports whether v is a range (From/To) rather than a list.
func (v Vary) IsRange() bool { return v.From != nil || v.To != nil }

// SweepSpec is the [sweep] section of a case as read by the loader.
type SweepSpec struct {
	Mode    string // "" when not given (grid)
	Samples int    // 0 when not given
	Seed    uint64
	HasSeed bool
	Vary    []Vary
}

// sweepSection reads and checks [sweep] (README, Case file reference): mode, samples, seed and
// every [[sweep.vary]]: its key path must lead to an existing table of the
// case (whether the last key itself is valid is checked by sweep.New, which
// tries it), its values must be single values, a range needs both ends of
// the same dimension and, in grid mode, a count ≥ 2. It returns nil when the
// case has no [sweep] or it is not a table.
func (l *loader) sweepSection(root *table) *SweepSpec {
	t := l.sub(root, "sweep", sweepKeys, nil)
	if t == nil {
		return nil
	}
	s := &SweepSpec{}
	if m, ok := l.str(t, "mode"); ok {
		if m != ModeGrid && m != ModeLatinHypercube {
			e := l.rangeErr(t.keyPath("mode"), m, "mode must be %q or %q", ModeGrid, ModeLatinHypercube)
			if g := Suggest(m, []string{ModeGrid, ModeLatinHypercube}); g != "" {
				e.Hint = fmt.Sprintf("did you mean mode = %q?", g)
			}
		}
		s.Mode = m
	}
	lhs := s.Mode == ModeLatinHypercube
	if n, ok := l.integer(t, "samples"); ok {
		switch {
		case !lhs:
			l.atKey(t.keyPath("samples"), ErrRange, "samples goes with mode = %q only", ModeLatinHypercube).Hint =
				"a grid runs every combination of the values; remove samples, or set mode = \"latin-hypercube\""
		case n < 1 || n > MaxLHSRuns:
			l.rangeErr(t.keyPath("samples"), n, "samples must be between 1 and %d", MaxLHSRuns)
		default:
			s.Samples = int(n)
		}
	} else if lhs && !t.has("samples") {
		l.add(l.loc.Table(t.path), t.keyPath("samples"), ErrMissing, nil,
			fmt.Sprintf("missing: mode = %q needs samples (the number of runs)", ModeLatinHypercube)).Hint =
			"add, for example: samples = 200"
	}
	if n, ok := l.integer(t, "seed"); ok {
		switch {
		case !lhs:
			l.atKey(t.keyPath("seed"), ErrRange, "seed goes with mode = %q only", ModeLatinHypercube)
		case n < 0:
			l.rangeErr(t.keyPath("seed"), n, "seed must not be negative")
		default:
			s.Seed, s.HasSeed = uint64(n), true
		}
	}
	if !t.has("vary") {
		return s
	}
	items, ok := l.arrayAt(t.keyPath("vary"), t.m["vary"])
	if !ok {
		return s
	}
	seen := make(map[string]string)
	for i, item := range items {
		path := fmt.Sprintf("sweep.vary.%d", i)
		vt := l.open(path, item, varyKeys, nil)
		if vt == nil {
			continue
		}
		if v, ok := l.varyTable(vt, root, lhs, seen); ok {
			s.Vary = append(s.Vary, v)
		}
	}
	if len(s.Vary) > MaxSweepKeys {
		l.atValue("sweep.vary", ErrRange, "at most %d keys can be varied, got %d", MaxSweepKeys, len(s.Vary))
	}
	return s
}

// varyTable reads one [[sweep.vary]] table.
func (l *loader) varyTable(t *table, root *table, lhs bool, seen map[string]string) (Vary, bool) {
	before := len(l.errs)
	var v Vary
	if !l.require(t, "key") {
		return v, false
	}
	key, ok := l.str(t, "key")
	if !ok {
		return v, false
	}
	v.Key = key
	if _, _, err := ResolveKey(root.m, key); err != nil {
		l.atValue(t.keyPath("key"), ErrReference, "%s", err)
	} else if prev, dup := seen[key]; dup {
		l.atValue(t.keyPath("key"), ErrDuplicate, "%q is already varied (line %d)", key, l.loc.Value(prev).Line)
	} else {
		seen[key] = t.keyPath("key")
	}
	list, rng := t.has("values"), t.has("from") || t.has("to")
	switch {
	case list && rng:
		l.atKey(t.keyPath("values"), ErrRange, "give either values = [...] or from/to, not both")
	case list:
		if t.has("count") {
			l.atKey(t.keyPath("count"), ErrRange, "count goes with from/to, not with values")
		}
		vals, ok := l.array(t, "values")
		if !ok {
			break
		}
		if len(vals) == 0 {
			l.atValue(t.keyPath("values"), ErrMissing, "values is empty: list at least one value")
		}
		shown := make(map[string]int)
		for i, x := range vals {
			p := fmt.Sprintf("%s.%d", t.keyPath("values"), i)
			s, _, err := ListValue(x)
			if err != nil {
				l.atValue(p, ErrType, "%s", err)
				continue
			}
			if j, dup := shown[s]; dup {
				l.atValue(p, ErrDuplicate, "%q is listed twice (also element %d)", s, j)
				continue
			}
			shown[s] = i
			v.Values = append(v.Values, x)
		}
	case rng:
		if !l.require(t, "from", "to") {
			break
		}
		v.From, v.To = t.m["from"], t.m["to"]
		if _, err := NewSpan(v.From, v.To); err != nil {
			l.atValue(t.keyPath("to"), ErrUnit, "%s", err)
		}
		if n, ok := l.integer(t, "count"); ok {
			if n < 2 || n > MaxGridRuns {
				l.rangeErr(t.keyPath("count"), n, "count must be between 2 and %d (both ends are included)", MaxGridRuns)
			}
			v.Count = int(min(max(n, 0), MaxGridRuns))
		} else if !lhs && !t.has("count") {
			l.add(l.loc.Table(t.path), t.keyPath("count"), ErrMissing, nil,
				"missing: a range in a grid needs count (the number of values, both ends included)").Hint =
				"add, for example: count = 5"
		}
	case l.suggested[t.keyPath("values")] || l.suggested[t.keyPath("from")] || l.suggested[t.keyPath("to")]:
		// a misspelt key, already reported with its suggestion
	default:
		l.add(l.loc.Table(t.path), t.keyPath("values"), ErrMissing, nil,
			"missing: a [[sweep.vary]] needs values = [...] or from, to (and count)").Hint =
			"for example: values = [\"4 mm\", \"8 mm\"], or from = \"1 C/min\", to = \"5 C/min\", count = 5"
	}
	return v, len(l.errs) == before
}
