package tune

import (
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/results"
	"cureslab/cases/uncertain"
	"cureslab/cases/units"
	"cureslab/solver"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"sort"
	"strconv"
	"strings"
	"sync"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"
	"gonum.org/v1/gonum/stat/distmv"
	"gonum.org/v1/gonum/stat/samplemv"
)

// ErrTune is wrapped by the errors of a tuning that cannot be done as
// asked: an unknown program, a bad --free, a case without criteria.
var ErrTune = errors.New("cannot tune")

// tuneError is an error of the tuning set-up; its message is complete.
type tuneError struct{ msg string }

func (e *tuneError) Error() string { return e.msg }
func (e *tuneError) Unwrap() error { return ErrTune }

func tuneFail(format string, a ...any) error { return &tuneError{msg: fmt.Sprintf(format, a...)} }

// The phases of a tuning, as written in tune.csv.
const (
	PhaseCase   = "case"   // the case's own program
	PhaseStart  = "start"  // a starting point (Latin hypercube over the box)
	PhaseSearch = "search" // Nelder–Mead on the penalised cycle time
	PhasePolish = "polish" // bisection along one free value toward a shorter cycle
)

// Free is one free value of a tuned program: the value at Key (a key path
// as in sweeps, inside [schedules.PROGRAM]) may take any value from From to
// To (quantities with their units, both of one dimension, as TOML values:
// strings such as "30 min", or plain numbers).
type Free struct {
	Key      string
	From, To any
}

// ParseFree reads a --free option: KEY=LO:HI, such as
// schedules.oven.segments.1.hold=30min:180min. Values keep their units and
// may omit the space. Whether KEY exists is checked by Tune.
func ParseFree(spec string) (Free, error) {
	fail := func(format string, a ...any) (Free, error) {
		return Free{}, tuneFail("--free %s: %s", spec, fmt.Sprintf(format, a...))
	}
	key, val, ok := strings.Cut(spec, "=")
	key = strings.TrimSpace(key)
	if !ok || key == "" {
		return fail("want KEY=LO:HI, such as schedules.oven.segments.1.hold=30min:180min")
	}
	if strings.ContainsAny(key, " \t") {
		return fail("the key path %q contains a space", key)
	}
	lo, hi, ok := strings.Cut(val, ":")
	if !ok || strings.Contains(hi, ":") || strings.TrimSpace(lo) == "" || strings.TrimSpace(hi) == "" {
		return fail("want the range LO:HI after '=', such as 30min:180min")
	}
	f := Free{Key: key, From: cases.ScalarText(lo), To: cases.ScalarText(hi)}
	if _, err := cases.NewSpan(f.From, f.To); err != nil {
		return fail("%v", err)
	}
	return f, nil
}

// TuneOptions say what to tune and how. Program is required; the zero value
// of every other field is its default.
type TuneOptions struct {
	Program string // the [schedules.NAME] to tune
	// Free, when not empty, are the only free values; otherwise every ramp
	// rate, hold temperature (the to of a ramp followed by a hold) and hold
	// time of the program is free within ±50 % (defaultFree).
	Free []Free
	// Robust > 0 evaluates every candidate over Robust Latin-hypercube
	// samples of [uncertainty] (the same samples for every candidate) and
	// requires the criteria to hold in its share of them.
	Robust int
	Seed   uint64 // seed of the starting points and of the robust samples; 0 means 1
	Jobs   int    // solver runs at a time; 0 means runtime.NumCPU()
	// Starts is the number of Nelder–Mead searches (default 3); Budget the
	// number of candidates each may evaluate (default 30·(k+1) for k free
	// values).
	Starts, Budget int
	// Progress, when not nil, gets one line updated in place: candidates
	// and runs so far, and the best feasible cycle. Pass a terminal only.
	Progress io.Writer
}

// FreeValue is one free value of a tuning, as resolved.
type FreeValue struct {
	Key      string // key path as given (or made by the defaults)
	From, To string // the bounds as written, From < To
	Case     string // the case's own value as written
	path     []string
	sp       cases.Span
	own      float64 // the case's value as a fraction of the range (may be outside [0, 1])
}

// Margin is one criterion of a candidate, in the units of summary.json:
// Value is the criterion's quantity (for a robust tuning, the value met by
// the required share of samples), Limit its limit, Margin how far inside
// the limit it is (negative outside: value − limit for min_cure, limit −
// value for the maxima, in K for temperatures). Value is NaN when no
// sample gives one (runaway) and Margin then −Inf.
type Margin struct {
	Name                 string
	Value, Limit, Margin float64
	norm                 float64 // Margin in units of tuneScale
}

// Candidate is one evaluated program.
type Candidate struct {
	Index  int      // 0-based, the row of tune.csv
	Phase  string   // PhaseCase, PhaseStart, PhaseSearch or PhasePolish
	Values []string // the free values as they went into the case (the case's own for PhaseCase)
	Cycle  float64  // the program's end, s; NaN when the candidate is invalid
	End    float64  // the time the runs end (time.end), s
	// Criteria are in the order min_cure, max_temperature, max_spread
	// (those the case sets).
	Criteria []Margin
	// Critical is the criterion that decides whether the candidate is
	// feasible: the one with the smallest margin (relative to its scale)
	// in the run at the required share (the only run without Robust).
	Critical Margin
	ShareMet float64 // share of the runs meeting every criterion
	Feasible bool    // ShareMet ≥ the required share
	Status   string  // "ok" if every run met the criteria, else the worst status met
	Err      string  // why an invalid candidate or a failed run failed
	Runs     int     // solver runs made for it

	x     []float64 // fractions of the free ranges
	order [3]int    // phase, search, sequence of its first request
	worst float64   // normalised robust margin over every criterion
	f     float64   // penalised objective
}

// TuneResult is the outcome of Tune.
type TuneResult struct {
	Program string
	File    string // the case file
	Free    []FreeValue
	Robust  int     // samples per candidate (0: the nominal case only)
	Share   float64 // share required (1 without Robust)
	Seed    uint64
	Inputs  []cases.UncertainInput // the uncertain inputs with Robust
	// Own is the case's own program, Best the shortest feasible candidate
	// (nil when none is feasible), Closest the candidate nearest to
	// feasible when none is (nil otherwise).
	Own, Best, Closest *Candidate
	// Limiting lists the criteria that limit a shorter cycle at Best:
	// first Best.Critical, then, when Active, every other criterion whose
	// margin is within a tenth of its scale (0.001 of cure, 0.1 K); nil
	// without Best. Active reports that Best.Critical is within that
	// tenth of its limit (else the ranges limit the program). AtBound lists
	// the free values of Best at the end of their range that a shorter
	// cycle would cross.
	Limiting []string
	Active   bool
	AtBound  []string
	// EndOffset is the time from the program's end to time.end when the
	// case sets time.end (kept for every candidate); NaN when time.end
	// follows the program (the loader's default).
	EndOffset  float64
	Candidates []*Candidate // every distinct candidate, in tune.csv order
	Runs       int          // solver runs in total
	// Block is the tuned [schedules.NAME] block (TOML, with units), ""
	// without Best.
	Block string
}

// tuneScale are the sizes that make the margins of different criteria
// comparable in the penalty: 0.01 of cure, 1 K.
var tuneScale = map[string]float64{results.CriterionMinCure: 0.01, results.CriterionMaxTemperature: 1, results.CriterionMaxSpread: 1}

// tuneBad is the normalised margin of a run that ran away or failed, and
// tuneInvalid the objective of a candidate the loader refuses.
const (
	tuneBad     = -100.0
	tuneInvalid = 1e6
	tuneActive  = 0.1 // a criterion within this many scales of its limit is at it
)

// Limits on a tuning, so that a typo cannot ask for hours.
const (
	maxTuneFree    = 20
	maxTuneSamples = 10_000
)

// Tune searches the free values of the program opt.Program of the case
// file data (named name, relative paths from dir) for the shortest program
// that meets every [criteria] limit (README, Case file reference).
//
// Problem: minimise the cycle time C(x), the end of the program, over the
// box of the free values x (each mapped to [0, 1]), subject to every
// criterion margin m_j(x) ≥ 0 (min_cure: final cure − limit; maxima: limit
// − value). With Robust = N, m_j is the ⌈share·N⌉-th best margin over N
// Latin-hypercube samples of [uncertainty] (the same samples, from
// opt.Seed, for every candidate: common random numbers), and the candidate
// is feasible when its worst margin per sample is ≥ 0 in at least that
// many samples. time.end follows the program (the loader's default) unless
// the case sets it; then the time from the program's end to time.end is
// kept.
//
// Method (deterministic for a seed, whatever opt.Jobs):
//
//  1. Start: the case's own program (clamped into the box) and 8 + 4k
//     Latin-hypercube points of the box (gonum samplemv.LatinHypercube,
//     source rand.NewPCG(seed, 1)).
//
//  2. Search: from the opt.Starts best starts by the penalised objective
//
//     F(x) = C(x)/C_case + Σ_j max(0, −m_j/s_j)² + max(0, −w/1)²
//
//     (s_j = 0.01 of cure or 1 K; w the worst normalised margin; a run
//     that runs away counts −100 on every criterion; a candidate the
//     loader refuses, such as a ramp that no longer reaches its to, costs
//     1e6), gonum's Nelder–Mead minimises F over y with x = (1 − cos y)/2,
//     a smooth change of variables that keeps x in the box; the searches
//     run concurrently.
//
//  3. Polish: from the shortest feasible candidate, each free value in
//     turn is moved toward the end of its range that shortens the cycle:
//     taken whole when that end is feasible, else bisected (12 halvings,
//     or until the written value no longer changes) between the feasible
//     value and that end; repeated while it gains (at most 3 passes).
//
// Free values are written with 4 significant digits of their range width
// (a hold of 2 h to 6 h to 0.001 h), so the recommended program is exactly
// the candidate that was run. Every candidate is cached by its written
// values and evaluated once.
//
// Errors (wrapping ErrTune, or an ErrorList for the case itself): an
// unknown program, a program that drives nothing, one given by a file, a
// --free outside the program or of the wrong dimension, a case without
// [criteria], Robust without [uncertainty] (ErrNoUncertainty). A candidate
// that fails is a row of tune.csv, not an error. Cancelling ctx stops the
// search: the result so far is returned with ctx's error.
//
// Cost: (9 + 4k + Starts·Budget + polish) candidates, each max(1, Robust)
// solver runs; with the defaults and k = 4 about 500 candidates.
func Tune(ctx context.Context, name string, data []byte, dir string, opt TuneOptions) (*TuneResult, error) {
	tu, err := newTuner(name, data, dir, opt)
	if err != nil {
		return nil, err
	}
	return tu.run(ctx)
}

// tuner is the state of one Tune.
type tuner struct {
	v       *cases.CaseVariant
	prog    string
	vars    []FreeValue
	res     *TuneResult
	crit    []Margin // names and limits in summary units, in order
	limitSI []float64
	endSet  bool
	offset  float64 // time.end − program end of the case, when endSet
	cRef    float64 // the case's cycle, s
	unc     *cases.Uncertainty
	pts     [][]float64 // robust samples, nil without Robust
	share   float64
	need    int // samples that must meet the criteria
	opt     TuneOptions
	sem     chan struct{}
	ctx     context.Context

	mu       sync.Mutex
	cache    map[string]*tuneEntry
	cyc      map[string]float64 // program end by written values, for the polish
	runs     int
	progress *uncertain.UncProgress
	best     float64
}

type tuneEntry struct {
	done chan struct{}
	c    *Candidate
}

func newTuner(name string, data []byte, dir string, opt TuneOptions) (*tuner, error) {
	v, c, err := cases.NewCaseVariant(name, data, dir)
	if err != nil {
		return nil, err
	}
	t := &tuner{v: v, prog: opt.Program, opt: opt, cache: map[string]*tuneEntry{}, cyc: map[string]float64{}}
	if opt.Program == "" {
		return nil, tuneFail("give the program to tune: --program NAME (one of %s)", strings.Join(sortedScheduleNames(c), ", "))
	}
	if _, ok := c.Schedules[opt.Program]; !ok {
		return nil, tuneFail("the case has no [schedules.%s]%s (it has %s)", opt.Program,
			cases.DidYouMeanKey(opt.Program, sortedScheduleNames(c)), strings.Join(sortedScheduleNames(c), ", "))
	}
	if !tuneDrives(c, opt.Program) {
		return nil, tuneFail("[schedules.%s] drives nothing in the case: no face air, platen or volumetric control uses it", opt.Program)
	}
	for _, m := range uncertain.CriteriaOf(c) {
		t.crit = append(t.crit, Margin{Name: m.Name, Limit: m.Limit})
	}
	if len(t.crit) == 0 {
		return nil, tuneFail("the case has no [criteria]: nothing limits a shorter program; add, for example:\n[criteria]\nmin_cure = 0.9")
	}
	for _, m := range t.crit {
		switch m.Name {
		case results.CriterionMinCure:
			t.limitSI = append(t.limitSI, c.Criteria.MinCure)
		case results.CriterionMaxTemperature:
			t.limitSI = append(t.limitSI, c.Criteria.MaxTemperature)
		case results.CriterionMaxSpread:
			t.limitSI = append(t.limitSI, c.Criteria.MaxSpread)
		}
	}
	if opt.Jobs < 0 {
		return nil, tuneFail("-j %d: want at least 1 job", opt.Jobs)
	}
	if opt.Starts < 0 || opt.Budget < 0 {
		return nil, tuneFail("starts and budget must not be negative")
	}
	if opt.Robust < 0 || opt.Robust > maxTuneSamples {
		return nil, tuneFail("--robust wants between 1 and %d samples, got %d", maxTuneSamples, opt.Robust)
	}
	if t.opt.Seed == 0 {
		t.opt.Seed = 1
	}
	if t.opt.Starts == 0 {
		t.opt.Starts = 3
	}
	if t.opt.Jobs == 0 {
		t.opt.Jobs = runtime.NumCPU()
	}
	if len(opt.Free) > 0 {
		err = t.explicitFree(opt.Free)
	} else {
		err = t.defaultFree()
	}
	if err != nil {
		return nil, err
	}
	if len(t.vars) > maxTuneFree {
		return nil, tuneFail("at most %d free values, got %d: choose some with --free", maxTuneFree, len(t.vars))
	}
	if t.opt.Budget == 0 {
		t.opt.Budget = 30 * (len(t.vars) + 1)
	}
	s := c.Schedules[opt.Program]
	t.cRef = s.End()
	if !(t.cRef > 0) {
		return nil, tuneFail("[schedules.%s] has no length (a steady value): nothing to shorten", opt.Program)
	}
	if tm, ok := v.Doc["time"].(map[string]any); ok {
		if _, ok := tm["end"]; ok {
			t.endSet = true
			t.offset = c.Problem.End - t.cRef
			if t.offset < 0 {
				return nil, tuneFail("time.end (%s) ends before program %s (%s): the criteria are judged at time.end; remove time.end (it then follows the program) or set it at or after the program's end",
					num.HumanTime(c.Problem.End), opt.Program, num.HumanTime(t.cRef))
			}
		}
	}
	t.share = 1
	if opt.Robust > 0 {
		unc, err := cases.ReadUncertainty(v.Name, v.Text, v.Doc)
		if err != nil {
			return nil, err
		}
		if unc == nil || len(unc.Inputs) == 0 {
			return nil, fmt.Errorf("%s: --robust: %w: add one, for example\n[uncertainty]\n\"top.h\" = \"±20 %%\"", name, uncertain.ErrNoUncertainty)
		}
		t.unc, t.share = unc, unc.Share
		u := uncertain.LhsPoints(opt.Robust, len(unc.Inputs), t.opt.Seed)
		for i := range opt.Robust {
			t.pts = append(t.pts, slices.Clone(u.RawRowView(i)[:len(unc.Inputs)]))
		}
	}
	n := max(1, opt.Robust)
	t.need = int(math.Ceil(t.share*float64(n) - 1e-9))
	t.need = min(max(t.need, 1), n)
	t.sem = make(chan struct{}, t.opt.Jobs)
	t.res = &TuneResult{Program: opt.Program, File: name, Free: t.vars, Robust: opt.Robust, Share: t.share,
		Seed: t.opt.Seed, EndOffset: math.NaN()}
	if t.endSet {
		t.res.EndOffset = t.offset
	}
	if t.unc != nil {
		t.res.Inputs = t.unc.Inputs
	}
	return t, nil
}

func sortedScheduleNames(c *cases.Case) []string {
	var out []string
	for n := range c.Schedules {
		out = append(out, n)
	}
	sort.Strings(out)
	return out
}

// tuneDrives reports whether the schedule prog drives a face or the control.
func tuneDrives(c *cases.Case, prog string) bool {
	if c.TopAir == prog || c.BottomAir == prog {
		return true
	}
	return c.Volumetric != nil && c.Volumetric.Program == prog
}

// programTable returns the decoded [schedules.prog].
func (t *tuner) programTable() map[string]any {
	s, _ := t.v.Doc["schedules"].(map[string]any)
	p, _ := s[t.prog].(map[string]any)
	return p
}

// defaultFree makes every ramp rate, hold temperature and hold time of the
// program free: a rate or a hold time within ±50 % of its value; the to of
// a ramp followed by a hold within ±50 % of the change the ramp makes (so
// that the ramp keeps its direction), in the units of the case.
func (t *tuner) defaultFree() error {
	p := t.programTable()
	segs, ok := p["segments"].([]any)
	if !ok {
		if _, isFile := p["file"]; isFile {
			return tuneFail("[schedules.%s] is a logged run (file): it has no values to tune", t.prog)
		}
		return tuneFail("[schedules.%s] is given by points: choose its free values with --free, such as --free schedules.%s.points.1.0=20min:60min", t.prog, t.prog)
	}
	startS, _ := p["start"].(string)
	prev, err := units.Parse(startS, units.Temperature)
	if err != nil {
		return tuneFail("[schedules.%s] start: %v", t.prog, err)
	}
	base := "schedules." + t.prog + ".segments."
	for i, sv := range segs {
		seg, _ := sv.(map[string]any)
		key := base + strconv.Itoa(i)
		if h, ok := seg["hold"].(string); ok {
			if err := t.addScaled(key+".hold", h, 0.5, 1.5); err != nil {
				return err
			}
			continue
		}
		r, _ := seg["ramp"].(string)
		to, _ := seg["to"].(string)
		if err := t.addScaled(key+".ramp", r, 0.5, 1.5); err != nil {
			return err
		}
		toSI, err := units.Parse(to, units.Temperature)
		if err != nil {
			return tuneFail("%s.to: %v", key, err)
		}
		if i+1 < len(segs) {
			if next, _ := segs[i+1].(map[string]any); next != nil {
				if _, hold := next["hold"]; hold {
					num, unit := cases.SplitNumber(strings.TrimSpace(to))
					unit = strings.TrimSpace(unit)
					a, _ := strconv.ParseFloat(num, 64)
					off, _ := units.Parse("0 "+unit, units.Temperature)
					one, _ := units.Parse("1 "+unit, units.Temperature)
					p := (prev - off) / (one - off)
					half := 0.5 * math.Abs(a-p)
					if err := t.addVar(key+".to", tuneFmtNum(a-half)+" "+unit, tuneFmtNum(a+half)+" "+unit); err != nil {
						return err
					}
				}
			}
		}
		prev = toSI
	}
	if len(t.vars) == 0 {
		return tuneFail("[schedules.%s] has no ramp or hold to tune", t.prog)
	}
	return nil
}

func tuneFmtNum(x float64) string { return strconv.FormatFloat(x, 'g', 12, 64) }

// addScaled adds the free value at key with the range lo·v .. hi·v of the
// value v written as val.
func (t *tuner) addScaled(key, val string, lo, hi float64) error {
	num, unit := cases.SplitNumber(strings.TrimSpace(val))
	a, err := strconv.ParseFloat(num, 64)
	if err != nil {
		return tuneFail("%s: cannot read %q", key, val)
	}
	unit = strings.TrimSpace(unit)
	return t.addVar(key, tuneFmtNum(lo*a)+" "+unit, tuneFmtNum(hi*a)+" "+unit)
}

// addVar resolves and adds one free value with the range from..to.
func (t *tuner) addVar(key string, from, to any) error {
	path, exists, err := cases.ResolveKey(t.v.Doc, key)
	if err != nil {
		return tuneFail("--free %s: %v", key, err)
	}
	if !exists {
		return tuneFail("--free %s: the program has no such value", key)
	}
	old := cases.Leaf(t.v.Doc, path)
	if err := cases.CheckKind(old, cases.Vary{Key: key, From: from, To: to}); err != nil {
		return tuneFail("--free %s: %v", key, err)
	}
	sp, err := cases.NewSpan(from, to)
	if err != nil {
		return tuneFail("--free %s: %v", key, err)
	}
	if sp.From > sp.To {
		sp.From, sp.To = sp.To, sp.From
	}
	// 4 significant digits of the range width.
	sp.Decimals = max(0, min(20, 3-int(math.Floor(math.Log10(sp.To-sp.From)))))
	fv := FreeValue{Key: key, Case: strings.Trim(cases.Written(old), `"`), path: path, sp: sp}
	fv.From, _ = sp.At(0)
	fv.To, _ = sp.At(1)
	fv.own = 0.5
	if x, ok := tuneInUnit(old, sp.Unit); ok {
		fv.own = (x - sp.From) / (sp.To - sp.From)
	}
	for _, o := range t.vars {
		if strings.Join(o.path, ".") == strings.Join(path, ".") {
			return tuneFail("--free %s: the same value as --free %s", key, o.Key)
		}
	}
	t.vars = append(t.vars, fv)
	return nil
}

// tuneInUnit returns the value v (a quantity string or a number) in unit.
func tuneInUnit(v any, unit string) (float64, bool) {
	switch x := v.(type) {
	case int64, float64:
		return cases.PlainNumber(x)
	case string:
		d := cases.DimOf(x)
		if d == 0 {
			return 0, false
		}
		si, err := units.Parse(x, d)
		off, err0 := units.Parse("0 "+unit, d)
		one, err1 := units.Parse("1 "+unit, d)
		if err != nil || err0 != nil || err1 != nil || one == off {
			return 0, false
		}
		return (si - off) / (one - off), true
	}
	return 0, false
}

// explicitFree resolves --free options: each must be a value of the
// program.
func (t *tuner) explicitFree(free []Free) error {
	prefix := "schedules." + t.prog + "."
	for _, f := range free {
		if !strings.HasPrefix(f.Key, prefix) {
			return tuneFail("--free %s: only values of the tuned program can be free (keys starting with %s)", f.Key, prefix)
		}
		if err := t.addVar(f.Key, f.From, f.To); err != nil {
			return err
		}
	}
	return nil
}

// shown returns the free values at x as written (x clamped to [0, 1]).
func (t *tuner) shown(x []float64) ([]string, []any) {
	s := make([]string, len(t.vars))
	v := make([]any, len(t.vars))
	for j := range t.vars {
		s[j], v[j] = t.vars[j].sp.At(min(max(x[j], 0), 1))
	}
	return s, v
}

// tree returns the decoded case with the free values vals (nil: the
// case's own) and time.end for the cycle when the case sets it.
func (t *tuner) tree(vals []any) map[string]any {
	var sets []cases.ValueSetting
	for j, val := range vals {
		sets = append(sets, cases.ValueSetting{Path: t.vars[j].path, Value: val})
	}
	return t.v.Tree(sets)
}

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
		if tuneOrderLess(order, e.c.order) {
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
	e = &tuneEntry{done: make(chan struct{}), c: c}
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

func tuneOrderLess(a, b [3]int) bool {
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

// run1 evaluates candidate c with the free values vals.
func (t *tuner) run1(c *Candidate, vals []any) {
	cs, tr, cyc, err := t.caseFor(vals)
	c.Cycle = cyc
	if err != nil {
		c.Cycle, c.Err, c.Status, c.f = math.NaN(), cases.FlattenErrors(err), results.StatusFailed, tuneInvalid
		c.worst = tuneBad
		c.Criteria = t.emptyMargins()
		return
	}
	c.End = cs.Problem.End
	n := max(1, len(t.pts))
	type out struct {
		norm   []float64 // normalised margins
		margin []float64 // margins in summary units
		status string
		err    string
	}
	outs := make([]out, n)
	var wg sync.WaitGroup
	for i := range n {
		wg.Add(1)
		go func() {
			defer wg.Done()
			t.sem <- struct{}{}
			defer func() { <-t.sem }()
			sc := cs
			if t.pts != nil {
				st := cases.CloneTree(tr).(map[string]any)
				if _, err := t.unc.Sample(st, t.pts[i]); err != nil {
					outs[i] = out{status: results.StatusFailed, err: err.Error()}
					return
				}
				var err error
				if sc, err = t.v.Parse(st); err != nil {
					outs[i] = out{status: results.StatusFailed, err: cases.FlattenErrors(err)}
					return
				}
			}
			sc.Problem.NoFields = true // judged on the summary alone
			r, err := solver.Run(t.ctx, sc.Problem)
			if err != nil {
				outs[i] = out{status: results.StatusFailed, err: err.Error()}
				return
			}
			o := out{status: results.StatusOf(r, results.Judge(sc, r))}
			if r.Err != nil {
				o.err = r.Err.Error()
			}
			o.norm, o.margin = t.margins(sc, r)
			outs[i] = o
		}()
	}
	wg.Wait()
	c.Runs = n
	// Aggregate: the need-th best margin of each criterion, and of the
	// worst margin per run.
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
				o.norm[j], o.margin[j] = tuneBad, math.Inf(-1)
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
	slices.SortStableFunc(idx, func(a, b int) int { return tuneCmp(worst[a], worst[b]) })
	c.worst = max(worst[idx[k]], tuneBad)
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
		m.norm, m.Margin = max(ns[k], tuneBad), ms[k]
		m.Value = criterionValue(m)
		c.Criteria[j] = m
		pen += tuneSq(min(0, m.norm))
	}
	pen += tuneSq(min(0, c.worst))
	c.f = c.Cycle/t.cRef + pen
}

func tuneSq(x float64) float64 { return x * x }

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
		m.Value, m.Margin, m.norm = math.NaN(), math.Inf(-1), tuneBad
		out[j] = m
	}
	return out
}

// margins returns the margin of each criterion of the run r of c,
// normalised and in summary units; a run that ran away or failed gets
// tuneBad on every criterion.
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
		norm[j] = v / tuneScale[m.Name]
		if r.Status != solver.OK {
			norm[j], margin[j] = tuneBad, math.Inf(-1)
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

// run carries out the method of Tune.
func (t *tuner) run(ctx context.Context) (*TuneResult, error) {
	t.ctx = ctx
	t.progress = &uncertain.UncProgress{W: t.opt.Progress, What: "candidates"}
	defer t.progress.Finish()
	k := len(t.vars)
	res := t.res

	// The case's own program.
	res.Own = t.evaluate(nil, PhaseCase, [3]int{0, 0, 0})

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
			cands[i] = t.evaluate(x, PhaseStart, [3]int{1, 0, i})
		}()
	}
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return t.finish(), err
	}

	// 2. Nelder–Mead from the best distinct starts.
	order := slices.Clone(cands)
	slices.SortStableFunc(order, func(a, b *Candidate) int { return tuneCmp(a.f, b.f) })
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

func tuneCmp(a, b float64) int {
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
			return tuneInvalid
		}
		for j := range y {
			x[j] = (1 - math.Cos(y[j])) / 2
		}
		seq++
		return t.evaluate(x, PhaseSearch, [3]int{2, s, seq}).f
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
		case tuneOrderLess(a.order, b.order):
			return -1
		case tuneOrderLess(b.order, a.order):
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
		return t.evaluate(x, PhasePolish, [3]int{3, 0, seq})
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
func (t *tuner) finish() *TuneResult {
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
	res.Active = b.worst <= tuneActive
	res.Limiting = []string{b.Critical.Name}
	if res.Active {
		for _, m := range b.Criteria {
			if m.norm <= tuneActive && m.Name != b.Critical.Name {
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
