package tune

import (
	"context"
	"cureslab/cases"
	"cureslab/cases/results"
	"errors"
	"fmt"
	"io"
	"strings"
)

// ErrTune is wrapped by the errors of a tuning that cannot be done as
// asked: an unknown program, a bad --free, a case without criteria.
var ErrTune = errors.New("cannot tune")

// errorf returns an error of the tuning set-up, wrapping ErrTune; its
// message is complete.
func errorf(format string, a ...any) error {
	return cases.Reason(ErrTune, nil, fmt.Sprintf(format, a...))
}

// The phases of a tuning, as written in tune.csv.
const (
	phaseCase   = "case"   // the case's own program
	phaseStart  = "start"  // a starting point (Latin hypercube over the box)
	phaseSearch = "search" // Nelder–Mead on the penalised cycle time
	phasePolish = "polish" // bisection along one free value toward a shorter cycle
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
		return Free{}, errorf("--free %s: %s", spec, fmt.Sprintf(format, a...))
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

// Options say what to tune and how. Program is required; the zero value
// of every other field is its default.
type Options struct {
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
	norm                 float64 // Margin in units of criterionScale
}

// Candidate is one evaluated program.
type Candidate struct {
	Index  int      // 0-based, the row of tune.csv
	Phase  string   // phaseCase, phaseStart, phaseSearch or phasePolish
	Values []string // the free values as they went into the case (the case's own for phaseCase)
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

// Result is the outcome of Tune.
type Result struct {
	// Interrupted marks the result of a search stopped by Ctrl-C or
	// SIGTERM (set by the caller): Best is then the best program found so
	// far, and tuned.toml says so.
	Interrupted bool
	Program     string
	File        string // the case file
	Free        []FreeValue
	Robust      int     // samples per candidate (0: the nominal case only)
	Share       float64 // share required (1 without Robust)
	Seed        uint64
	Inputs      []cases.UncertainInput // the uncertain inputs with Robust
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

// criterionScale are the sizes that make the margins of different criteria
// comparable in the penalty: 0.01 of cure, 1 K.
var criterionScale = map[string]float64{results.CriterionMinCure: 0.01, results.CriterionMaxTemperature: 1, results.CriterionMaxSpread: 1}

// badMargin is the normalised margin of a run that ran away or failed, and
// invalidObjective the objective of a candidate the loader refuses.
const (
	badMargin        = -100.0
	invalidObjective = 1e6
	activeWithin     = 0.1 // a criterion within this many scales of its limit is at it
)

// Limits on a tuning, so that a typo cannot ask for hours.
const (
	maxFree    = 20
	maxSamples = 10_000
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
func Tune(ctx context.Context, name string, data []byte, dir string, opt Options) (*Result, error) {
	tu, err := newTuner(name, data, dir, opt)
	if err != nil {
		return nil, err
	}
	return tu.run(ctx)
}
