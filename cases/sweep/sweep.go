package sweep

import (
	"context"
	"crypto/sha256"
	"cureslab/cases"
	"cureslab/cases/limits"
	"cureslab/cases/results"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"math/rand/v2"
	"path/filepath"
	"strings"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distmv"
	"gonum.org/v1/gonum/stat/samplemv"
)

// Errors of sweeps, for errors.Is.
var (
	// ErrInvalid is wrapped by the error of a sweep that cannot be run as
	// asked: nothing to vary, an unknown key path, a bad --vary, a bad
	// shard.
	ErrInvalid = errors.New("invalid sweep")
	// ErrMismatch is wrapped when a directory holds another sweep than
	// the one being run or merged.
	ErrMismatch = errors.New("different sweep")
	// ErrIncomplete is wrapped by Merge when runs are missing.
	ErrIncomplete = errors.New("incomplete sweep")
)

// sweepError is an error of a sweep definition, an option or a directory;
// its message is complete (no prefix is added).
type sweepError struct {
	msg  string
	kind error // nil means ErrInvalid
}

func (e *sweepError) Error() string { return e.msg }

func (e *sweepError) Unwrap() error {
	if e.kind == nil {
		return ErrInvalid
	}
	return e.kind
}

// Settings are the parts of a sweep given on the command line. The
// zero value takes everything from the [sweep] section of the case.
type Settings struct {
	// Vary, when not empty, replaces the whole [[sweep.vary]] list of the
	// case (it is not merged with it key by key).
	Vary []cases.Vary
	// Mode replaces [sweep] mode when not "": ModeGrid or
	// ModeLatinHypercube. The default is ModeGrid.
	Mode string
	// Samples replaces [sweep] samples when > 0 (latin-hypercube only).
	Samples int
	// Seed replaces [sweep] seed when SeedSet (latin-hypercube only). The
	// default seed is 1.
	Seed    uint64
	SeedSet bool
}

// Sweep is a batch of runs of one case with some of its values changed
// (README, Case file reference), ready to run (Sweep.Run) or to inspect. Every run has a
// stable 0-based index; run i is the case with the values Values(i) put in
// place of the varied keys, and is validated exactly like a case file.
//
// A Sweep is immutable after New: Run and Case may be called from
// several goroutines.
type Sweep struct {
	Name    string   // file name of the case (without directory), used in messages
	Mode    string   // ModeGrid or ModeLatinHypercube
	Samples int      // latin-hypercube: the number of runs; 0 for a grid
	Seed    uint64   // latin-hypercube: the seed of the sampler
	Keys    []string // the varied key paths as given, in order
	Runs    int      // number of runs

	v      *cases.CaseVariant // the case file, decoded; only read
	hash   [32]byte           // SHA-256 of the case file
	axes   []axis
	stride []int      // grid: run i uses value (i / stride[k]) % len of axis k
	u      *mat.Dense // latin-hypercube: Runs × len(axes) sample in [0, 1)
	def    []byte     // sweep.json
}

// axis is one varied key.
type axis struct {
	key    string
	path   []string    // resolved path in the decoded case
	shown  []string    // list values as written in summary.csv
	values []any       // list values as they go into the case
	rng    *cases.Span // latin-hypercube: a continuous range instead of a list
}

// Load reads the case file at path and resolves its sweep (see
// New); relative paths in the case are taken from its directory.
func Load(path string, set Settings) (*Sweep, error) {
	data, err := limits.ReadFile(context.Background(), path, limits.MaxFileSize)
	if err != nil {
		return nil, cases.ErrorList{{File: path, Err: cases.Reason(cases.ErrFile, err, fmt.Sprintf("cannot read the case file: %v", err))}}
	}
	return New(filepath.Base(path), data, filepath.Dir(path), set)
}

// New resolves the sweep of the case file data (named name in
// messages, with relative paths taken from dir): the [sweep] section of the
// case, with set applied on top (the command line wins).
//
// Runs. A grid has one run for every combination of the values, the last
// key varying fastest (like nested loops in the order the keys are given);
// a range FROM..TO with COUNT gives COUNT values, both ends included,
// linear in SI and written in the unit of FROM. Latin hypercube draws
// Samples points u in [0, 1)^k with gonum's samplemv.LatinHypercube and a
// PCG source seeded with (Seed, 0), so the same seed gives the same runs;
// a range then gives FROM + (TO − FROM)·u and a list of n values its
// element floor(u·n). Values computed from a range are rounded to 9
// significant digits of the larger end (integers when both ends are
// integers), and the run uses exactly the value shown.
//
// Checks, all before anything runs: the case itself must be valid (its
// errors come back as an ErrorList); every key path must lead into the
// case (tables, layers by name, array elements by 0-based index, and a
// last key that the case file accepts); ranges need ends of one dimension.
// Such errors wrap ErrInvalid (or are an ErrorList, positioned, for the
// [sweep] section of the file). A value that is invalid for its key (a
// negative thickness) is not an error here: that run fails and says why.
//
// Cost: one parse of the case, plus one to try key paths absent from the
// case; memory O(Runs·k) for latin-hypercube, O(Σ values) for a grid.
func New(name string, data []byte, dir string, set Settings) (*Sweep, error) {
	v, _, err := cases.NewCaseVariant(name, data, dir)
	if err != nil {
		return nil, err
	}
	spec := v.SweepSection()
	s := &Sweep{Name: name, v: v, hash: sha256.Sum256(data)}
	if err := s.setMode(spec, set); err != nil {
		return nil, err
	}
	vary, fromFile := spec.Vary, true
	if len(set.Vary) > 0 {
		vary, fromFile = set.Vary, false
	}
	if len(vary) == 0 {
		return nil, &sweepError{msg: "nothing to vary: give --vary KEY=V1,V2,... or [[sweep.vary]] entries in the case"}
	}
	if len(vary) > cases.MaxSweepKeys {
		return nil, &sweepError{msg: fmt.Sprintf("at most %d keys can be varied, got %d", cases.MaxSweepKeys, len(vary))}
	}
	// where turns a problem with vary[i] into an error: positioned in the
	// case file for [[sweep.vary]], about the option for --vary.
	where := func(i int, err error) error {
		if fromFile {
			return v.ErrorAt(fmt.Sprintf("sweep.vary.%d.key", i), cases.ErrReference, err.Error())
		}
		return &sweepError{msg: fmt.Sprintf("--vary %s: %v", vary[i].Key, err)}
	}
	seen := make(map[string]bool)
	var absent []int
	for i, x := range vary {
		if seen[x.Key] {
			return nil, where(i, fmt.Errorf("%q is varied twice", x.Key))
		}
		seen[x.Key] = true
		a, exists, err := newAxis(v.Doc, x, s.Mode == cases.ModeLatinHypercube)
		if err != nil {
			return nil, where(i, err)
		}
		if !exists {
			absent = append(absent, i)
		}
		s.axes = append(s.axes, a)
		s.Keys = append(s.Keys, x.Key)
	}
	if err := s.countRuns(); err != nil {
		return nil, err
	}
	// A key that the case does not have yet (such as time.end) must be
	// one the case file accepts: try it.
	if len(absent) > 0 {
		_, vals := s.point(0)
		var list cases.ErrorList
		if errors.As(v.Validate(s.tree(vals)), &list) {
			for _, i := range absent {
				want := strings.Join(s.axes[i].path, ".")
				for _, e := range list {
					if e.Key == want && errors.Is(e, cases.ErrUnknownKey) {
						return nil, where(i, e.Err)
					}
				}
			}
		}
	}
	s.def = s.definition()
	return s, nil
}

// setMode sets the mode, samples and seed of s from the [sweep] section
// spec and the command line set (which wins).
func (s *Sweep) setMode(spec *cases.SweepSpec, set Settings) error {
	fail := func(format string, a ...any) error {
		return &sweepError{msg: fmt.Sprintf(format, a...)}
	}
	s.Mode = cases.ModeGrid
	if spec.Mode != "" {
		s.Mode = spec.Mode
	}
	switch set.Mode {
	case "":
	case cases.ModeGrid, cases.ModeLatinHypercube:
		s.Mode = set.Mode
	default:
		return fail("unknown mode %q: want %q or %q%s", set.Mode, cases.ModeGrid, cases.ModeLatinHypercube,
			cases.DidYouMeanKey(set.Mode, []string{cases.ModeGrid, cases.ModeLatinHypercube}))
	}
	lhs := s.Mode == cases.ModeLatinHypercube
	switch {
	case !lhs && set.Samples != 0:
		return fail("--samples goes with --mode %s (a grid runs every combination)", cases.ModeLatinHypercube)
	case !lhs && set.SeedSet:
		return fail("--seed goes with --mode %s (a grid is not random)", cases.ModeLatinHypercube)
	case set.Samples < 0 || set.Samples > cases.MaxLHSRuns:
		return fail("--samples must be between 1 and %d, got %d", cases.MaxLHSRuns, set.Samples)
	}
	if !lhs {
		return nil
	}
	s.Samples, s.Seed = spec.Samples, 1
	if set.Samples > 0 {
		s.Samples = set.Samples
	}
	if spec.HasSeed {
		s.Seed = spec.Seed
	}
	if set.SeedSet {
		s.Seed = set.Seed
	}
	if s.Samples == 0 {
		return fail("mode %s needs a number of samples: give --samples N or samples = N in [sweep]", cases.ModeLatinHypercube)
	}
	return nil
}

// newAxis resolves the varied key v in the decoded case doc and lists its
// values (a latin-hypercube range stays a range); exists reports whether
// the case has the key.
func newAxis(doc map[string]any, v cases.Vary, lhs bool) (a axis, exists bool, err error) {
	path, exists, err := cases.ResolveKey(doc, v.Key)
	if err != nil {
		return a, exists, err
	}
	a = axis{key: v.Key, path: path}
	switch {
	case v.IsRange():
		sp, err := cases.NewSpan(v.From, v.To)
		if err != nil {
			return a, exists, err
		}
		if lhs {
			a.rng = &sp
			break
		}
		if v.Count < 2 {
			return a, exists, errors.New("a range in a grid needs a count of at least 2 (both ends are included): FROM:TO:COUNT")
		}
		dup := make(map[string]bool)
		for k := range v.Count {
			sh, val := sp.At(float64(k) / float64(v.Count-1))
			if dup[sh] {
				return a, exists, fmt.Errorf("the range gives %q twice: use a smaller count", sh)
			}
			dup[sh] = true
			a.shown, a.values = append(a.shown, sh), append(a.values, val)
		}
	default:
		if len(v.Values) == 0 {
			return a, exists, errors.New("no values")
		}
		dup := make(map[string]bool)
		for _, x := range v.Values {
			sh, val, err := cases.ListValue(x)
			if err != nil {
				return a, exists, err
			}
			if dup[sh] {
				return a, exists, fmt.Errorf("%q is listed twice", sh)
			}
			dup[sh] = true
			a.shown, a.values = append(a.shown, sh), append(a.values, val)
		}
	}
	if exists {
		if err := cases.CheckKind(cases.Leaf(doc, path), v); err != nil {
			return a, exists, err
		}
	}
	return a, exists, nil
}

// countRuns sets Runs: the samples of a latin hypercube (drawn here), or
// the product of the axis lengths of a grid (with the strides of its axes).
func (s *Sweep) countRuns() error {
	if s.Mode == cases.ModeLatinHypercube {
		s.Runs = s.Samples
		s.u = mat.NewDense(s.Runs, len(s.axes), nil)
		samplemv.LatinHypercube{Q: distmv.NewUnitUniform(len(s.axes), nil), Src: rand.NewPCG(s.Seed, 0)}.Sample(s.u)
		return nil
	}
	s.Runs = 1
	s.stride = make([]int, len(s.axes))
	for k := len(s.axes) - 1; k >= 0; k-- {
		s.stride[k] = s.Runs
		n := len(s.axes[k].values)
		if s.Runs > cases.MaxGridRuns/n {
			return &sweepError{msg: fmt.Sprintf("the grid has more than %d runs: vary fewer values, or use --mode %s", cases.MaxGridRuns, cases.ModeLatinHypercube)}
		}
		s.Runs *= n
	}
	return nil
}

// point returns the values of run r: as shown in summary.csv and as they go
// into the case. r must be in [0, Runs).
func (s *Sweep) point(r int) (shown []string, values []any) {
	shown = make([]string, len(s.axes))
	values = make([]any, len(s.axes))
	for k, a := range s.axes {
		if s.u == nil {
			j := (r / s.stride[k]) % len(a.values)
			shown[k], values[k] = a.shown[j], a.values[j]
			continue
		}
		u := s.u.At(r, k)
		if a.rng != nil {
			shown[k], values[k] = a.rng.At(u)
			continue
		}
		j := min(int(u*float64(len(a.values))), len(a.values)-1)
		shown[k], values[k] = a.shown[j], a.values[j]
	}
	return shown, values
}

// Values returns the varied values of run r as written in summary.csv, in
// the order of Keys. It panics if r is outside [0, Runs).
func (s *Sweep) Values(r int) []string {
	if r < 0 || r >= s.Runs {
		panic(fmt.Sprintf("sweep: run %d outside the sweep (0 to %d)", r, s.Runs-1))
	}
	shown, _ := s.point(r)
	return shown
}

// Case returns the validated case of run r, or the errors that make it
// invalid (an ErrorList, positioned in the case file at the value that was
// replaced). It panics if r is outside [0, Runs).
func (s *Sweep) Case(r int) (*cases.Case, error) {
	if r < 0 || r >= s.Runs {
		panic(fmt.Sprintf("sweep: run %d outside the sweep (0 to %d)", r, s.Runs-1))
	}
	_, vals := s.point(r)
	return s.caseOf(vals)
}

// caseOf returns the validated case with the axes set to vals.
//
// A probe of [output] that is not varied and that a run's values put below
// the stack (a thinner layer) is dropped from that run, rather than failing
// it: probes do not enter the summary.
func (s *Sweep) caseOf(vals []any) (*cases.Case, error) {
	return s.v.ParseKeeping(s.tree(vals), s.varied)
}

// varied reports whether the loader key path p is varied.
func (s *Sweep) varied(p string) bool {
	for _, a := range s.axes {
		if strings.Join(a.path, ".") == p {
			return true
		}
	}
	return false
}

// tree returns a deep copy of the decoded case with the axes set to vals.
func (s *Sweep) tree(vals []any) map[string]any {
	t := cases.CloneTree(s.v.Doc).(map[string]any)
	for k, a := range s.axes {
		cases.SetPath(t, a.path, vals[k])
	}
	return t
}

// definition returns sweep.json: the SHA-256 of the case file, the mode,
// the varied keys with their values (or range ends), the number of runs,
// and a SHA-256 of every run's values, so that a change of the sampler
// would also show.
func (s *Sweep) definition() []byte {
	d := results.SweepDef{Format: results.SweepFormat, CaseSHA256: hex.EncodeToString(s.hash[:]), Mode: s.Mode, Runs: s.Runs}
	if s.Mode == cases.ModeLatinHypercube {
		seed := s.Seed
		d.Samples, d.Seed = s.Samples, &seed
	}
	for _, a := range s.axes {
		v := results.VaryDef{Key: a.key, Values: a.shown}
		if a.rng != nil {
			v.From, _ = a.rng.At(0)
			v.To, _ = a.rng.At(1)
		}
		d.Vary = append(d.Vary, v)
	}
	h := sha256.New()
	for r := range s.Runs {
		shown, _ := s.point(r)
		for _, v := range shown {
			h.Write([]byte(v))
			h.Write([]byte{0x1f})
		}
		h.Write([]byte{0x1e})
	}
	d.RunsSHA256 = hex.EncodeToString(h.Sum(nil))
	b, err := json.MarshalIndent(d, "", "  ")
	if err != nil {
		panic("sweep: definition: " + err.Error()) // not reached: plain types
	}
	return append(b, '\n')
}
