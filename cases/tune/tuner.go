package tune

import (
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/results"
	"cureslab/cases/uncertain"
	"cureslab/cases/units"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sort"
	"strconv"
	"strings"
	"sync"
)

// tuner is the state of one Tune.
type tuner struct {
	v       *cases.CaseVariant
	prog    string
	vars    []FreeValue
	res     *Result
	crit    []Margin // names and limits in summary units, in order
	limitSI []float64
	endSet  bool
	offset  float64 // time.end − program end of the case, when endSet
	cRef    float64 // the case's cycle, s
	unc     *cases.Uncertainty
	pts     [][]float64 // robust samples, nil without Robust
	share   float64
	need    int // samples that must meet the criteria
	opt     Options
	sem     chan struct{}
	ctx     context.Context

	mu       sync.Mutex
	cache    map[string]*cacheEntry
	cyc      map[string]float64 // program end by written values, for the polish
	runs     int
	progress *uncertain.Progress
	best     float64
}

type cacheEntry struct {
	done chan struct{}
	c    *Candidate
}

func newTuner(name string, data []byte, dir string, opt Options) (*tuner, error) {
	v, c, err := cases.NewCaseVariant(name, data, dir)
	if err != nil {
		return nil, err
	}
	t := &tuner{v: v, prog: opt.Program, opt: opt, cache: map[string]*cacheEntry{}, cyc: map[string]float64{}}
	if opt.Program == "" {
		return nil, errorf("give the program to tune: --program NAME (one of %s)", strings.Join(sortedScheduleNames(c), ", "))
	}
	if _, ok := c.Schedules[opt.Program]; !ok {
		return nil, errorf("the case has no [schedules.%s]%s (it has %s)", opt.Program,
			cases.DidYouMeanKey(opt.Program, sortedScheduleNames(c)), strings.Join(sortedScheduleNames(c), ", "))
	}
	if !programDrives(c, opt.Program) {
		return nil, errorf("[schedules.%s] drives nothing in the case: no face air, platen or volumetric control uses it", opt.Program)
	}
	if err := t.criteria(c); err != nil {
		return nil, err
	}
	if err := t.options(opt); err != nil {
		return nil, err
	}
	if len(opt.Free) > 0 {
		err = t.explicitFree(opt.Free)
	} else {
		err = t.defaultFree()
	}
	if err != nil {
		return nil, err
	}
	if len(t.vars) > maxFree {
		return nil, errorf("at most %d free values, got %d: choose some with --free", maxFree, len(t.vars))
	}
	if t.opt.Budget == 0 {
		t.opt.Budget = 30 * (len(t.vars) + 1)
	}
	s := c.Schedules[opt.Program]
	t.cRef = s.End()
	if !(t.cRef > 0) {
		return nil, errorf("[schedules.%s] has no length (a steady value): nothing to shorten", opt.Program)
	}
	if tm, ok := v.Doc["time"].(map[string]any); ok {
		if _, ok := tm["end"]; ok {
			t.endSet = true
			t.offset = c.Problem.End - t.cRef
			if t.offset < 0 {
				return nil, errorf("time.end (%s) ends before program %s (%s): the criteria are judged at time.end; remove time.end (it then follows the program) or set it at or after the program's end",
					num.HumanTime(c.Problem.End), opt.Program, num.HumanTime(t.cRef))
			}
		}
	}
	if err := t.robust(name, opt); err != nil {
		return nil, err
	}
	t.sem = make(chan struct{}, t.opt.Jobs)
	t.res = &Result{Program: opt.Program, File: name, Free: t.vars, Robust: opt.Robust, Share: t.share,
		Seed: t.opt.Seed, EndOffset: math.NaN()}
	if t.endSet {
		t.res.EndOffset = t.offset
	}
	if t.unc != nil {
		t.res.Inputs = t.unc.Inputs
	}
	return t, nil
}

// criteria takes the criteria of c, with their limits in SI, as what the
// tuner must meet.
func (t *tuner) criteria(c *cases.Case) error {
	for _, m := range uncertain.CriteriaOf(c) {
		t.crit = append(t.crit, Margin{Name: m.Name, Limit: m.Limit})
	}
	if len(t.crit) == 0 {
		return errorf("the case has no [criteria]: nothing limits a shorter program; add, for example:\n[criteria]\nmin_cure = 0.9")
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
	return nil
}

// options checks the counts of opt and fills in their defaults.
func (t *tuner) options(opt Options) error {
	if opt.Jobs < 0 {
		return errorf("-j %d: want at least 1 job", opt.Jobs)
	}
	if opt.Starts < 0 || opt.Budget < 0 {
		return errorf("starts and budget must not be negative")
	}
	if opt.Robust < 0 || opt.Robust > maxSamples {
		return errorf("--robust wants between 1 and %d samples, got %d", maxSamples, opt.Robust)
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
	return nil
}

// robust draws the sample points of --robust from [uncertainty] and sets how
// many runs of a candidate must meet the criteria.
func (t *tuner) robust(name string, opt Options) error {
	t.share = 1
	if opt.Robust > 0 {
		unc, err := cases.ReadUncertainty(t.v.Name, t.v.Text, t.v.Doc)
		if err != nil {
			return err
		}
		if unc == nil || len(unc.Inputs) == 0 {
			return fmt.Errorf("%s: --robust: %w: add one, for example\n[uncertainty]\n\"top.h\" = \"±20 %%\"", name, uncertain.ErrNoUncertainty)
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
	return nil
}

func sortedScheduleNames(c *cases.Case) []string {
	var out []string
	for n := range c.Schedules {
		out = append(out, n)
	}
	sort.Strings(out)
	return out
}

// programDrives reports whether the schedule prog drives a face or the control.
func programDrives(c *cases.Case, prog string) bool {
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
			return errorf("[schedules.%s] is a logged run (file): it has no values to tune", t.prog)
		}
		return errorf("[schedules.%s] is given by points: choose its free values with --free, such as --free schedules.%s.points.1.0=20min:60min", t.prog, t.prog)
	}
	startS, _ := p["start"].(string)
	prev, err := units.Parse(startS, units.Temperature)
	if err != nil {
		return errorf("[schedules.%s] start: %v", t.prog, err)
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
			return errorf("%s.to: %v", key, err)
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
					if err := t.addVar(key+".to", formatNum(a-half)+" "+unit, formatNum(a+half)+" "+unit); err != nil {
						return err
					}
				}
			}
		}
		prev = toSI
	}
	if len(t.vars) == 0 {
		return errorf("[schedules.%s] has no ramp or hold to tune", t.prog)
	}
	return nil
}

func formatNum(x float64) string { return strconv.FormatFloat(x, 'g', 12, 64) }

// addScaled adds the free value at key with the range lo·v .. hi·v of the
// value v written as val.
func (t *tuner) addScaled(key, val string, lo, hi float64) error {
	num, unit := cases.SplitNumber(strings.TrimSpace(val))
	a, err := strconv.ParseFloat(num, 64)
	if err != nil {
		return errorf("%s: cannot read %q", key, val)
	}
	unit = strings.TrimSpace(unit)
	return t.addVar(key, formatNum(lo*a)+" "+unit, formatNum(hi*a)+" "+unit)
}

// addVar resolves and adds one free value with the range from..to.
func (t *tuner) addVar(key string, from, to any) error {
	path, exists, err := cases.ResolveKey(t.v.Doc, key)
	if err != nil {
		return errorf("--free %s: %v", key, err)
	}
	if !exists {
		return errorf("--free %s: the program has no such value", key)
	}
	old := cases.Leaf(t.v.Doc, path)
	if err := cases.CheckKind(old, cases.Vary{Key: key, From: from, To: to}); err != nil {
		return errorf("--free %s: %v", key, err)
	}
	sp, err := cases.NewSpan(from, to)
	if err != nil {
		return errorf("--free %s: %v", key, err)
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
	if x, ok := cases.InUnit(old, sp.Unit); ok {
		fv.own = (x - sp.From) / (sp.To - sp.From)
	}
	for _, o := range t.vars {
		if strings.Join(o.path, ".") == strings.Join(path, ".") {
			return errorf("--free %s: the same value as --free %s", key, o.Key)
		}
	}
	t.vars = append(t.vars, fv)
	return nil
}

// explicitFree resolves --free options: each must be a value of the
// program.
func (t *tuner) explicitFree(free []Free) error {
	prefix := "schedules." + t.prog + "."
	for _, f := range free {
		if !strings.HasPrefix(f.Key, prefix) {
			return errorf("--free %s: only values of the tuned program can be free (keys starting with %s)", f.Key, prefix)
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
