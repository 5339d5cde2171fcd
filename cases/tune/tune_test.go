package tune

import (
	"bytes"
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/testkit"
	"cureslab/cases/results"
	"cureslab/cases/sweep"
	"cureslab/cases/uncertain"
	"cureslab/cases/units"
	"cureslab/solver"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/BurntSushi/toml"
)

func solverRunForTest(c *cases.Case) (*solver.Result, error) {
	return solver.Run(context.Background(), c.Problem)
}

// runTune tunes testdata/tune/NAME.toml (with extra appended).
func runTune(t *testing.T, name, extra string, opt Options) *Result {
	t.Helper()
	res, err := Tune(context.Background(), name+".toml", testkit.TuneCase(t, name, extra), testkit.TuneDir, opt)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

func mustFree(t *testing.T, specs ...string) []Free {
	t.Helper()
	var out []Free
	for _, s := range specs {
		f, err := ParseFree(s)
		if err != nil {
			t.Fatal(err)
		}
		out = append(out, f)
	}
	return out
}

// holdOf returns the hold of segment 1 of the tuned program, in s.
func holdOf(t *testing.T, c *Candidate) float64 {
	t.Helper()
	h, err := units.Parse(c.Values[0], units.Time)
	if err != nil {
		t.Fatal(err)
	}
	return h
}

// TestTuneOneHold: with the hold time of a ramp-and-hold program free and
// only min_cure, the shortest program ends when the coldest cell reaches
// the target.
func TestTuneOneHold(t *testing.T) {
	res := runTune(t, "hold", "", Options{Program: "oven", Free: mustFree(t, "schedules.oven.segments.1.hold=5min:120min"), Jobs: 2})
	if res.Best == nil {
		t.Fatal("no feasible program")
	}
	hold := holdOf(t, res.Best)
	// Source: analytic, the ramp from 23 C to 100 C at 10 C/min takes 7.7 min.
	const ramp = 7.7 * 60
	if math.Abs(res.Best.Cycle-(ramp+hold)) > 1e-6 {
		t.Errorf("cycle %v s, want ramp + hold = %v s", res.Best.Cycle, ramp+hold)
	}

	// Reference 1, exhaustive sweep: every hold from 5 to 120 min in steps
	// of 1 min, run through the sweep machinery; the shortest that meets
	// min_cure is href. The tuned hold is on a finer grid (0.1 min) that
	// contains this one, so it must lie in (href − 1 min, href].
	text := testkit.TuneCase(t, "hold", "")
	sw, err := sweep.New("hold.toml", text, testkit.TuneDir, sweep.Settings{Vary: []cases.Vary{{Key: "schedules.oven.segments.1.hold", From: "5 min", To: "120 min", Count: 116}}})
	if err != nil {
		t.Fatal(err)
	}
	href := math.NaN()
	for r := range sw.Runs {
		c, err := sw.Case(r)
		if err != nil {
			t.Fatal(err)
		}
		res, err := solverRunForTest(c)
		if err != nil {
			t.Fatal(err)
		}
		if results.Judge(c, res)[0].Pass {
			href = float64(5+r) * 60
			break
		}
	}
	if !(hold > href-60 && hold <= href) {
		t.Errorf("tuned hold %v s; exhaustive sweep: first hold meeting min_cure %v s, so want it in (%v, %v]", hold, href, href-60, href)
	}

	// Reference 2, one long run: the earliest output time (every 10 s) at
	// which the coldest curing cell has reached 0.9. The program's end must
	// be within one output interval before it, plus the tuner's grid
	// (0.1 min), plus the time the cure takes to change by the solver's
	// cure tolerance (1e-4, the case's) at the rate of the coldest cell
	// there: the two runs take different steps.
	long := strings.Replace(string(text), `{ hold = "90 min" }`, `{ hold = "120 min" }`, 1)
	long = strings.Replace(long, `output_every = "1 min"`, `output_every = "10 s"`, 1)
	c, err := cases.Parse("long.toml", []byte(long), testkit.TuneDir)
	if err != nil {
		t.Fatal(err)
	}
	r, err := solverRunForTest(c)
	if err != nil {
		t.Fatal(err)
	}
	tref, rate := math.NaN(), math.NaN()
	for _, s := range r.Snapshots {
		lo, at := math.Inf(1), -1
		for i, a := range s.Cure {
			if !math.IsNaN(a) && a < lo {
				lo, at = a, i
			}
		}
		if lo >= 0.9 {
			tref, rate = s.Time, s.Rate[at]
			break
		}
	}
	slack := 1e-4 / rate
	if got := res.Best.Cycle; !(got > tref-10-slack && got <= tref+6+slack) {
		t.Errorf("tuned cycle %v s; long run: coldest cell reaches 0.9 by t = %v s (output every 10 s, rate %.3g 1/s), want it in (%v, %v]",
			got, tref, rate, tref-10-slack, tref+6+slack)
	}
	t.Logf("hold %v s, sweep %v s, long run %v s (rate %.3g, slack %.3g s), cycle %v s", hold, href, tref, rate, slack, res.Best.Cycle)
	if res.Best.Criteria[0].Margin < 0 || !res.Best.Feasible || res.Limiting[0] != results.CriterionMinCure || !res.Active {
		t.Errorf("best: %+v, limiting %v", res.Best, res.Limiting)
	}
}

// tunedCase puts the [schedules.NAME] block of tuned.toml in place of the
// case's own, as a user pasting it would, and parses the result.
func tunedCase(t *testing.T, text []byte, tuned []byte, prog string) *cases.Case {
	t.Helper()
	var doc, blk map[string]any
	if _, err := toml.Decode(string(text), &doc); err != nil {
		t.Fatal(err)
	}
	if _, err := toml.Decode(string(tuned), &blk); err != nil {
		t.Fatalf("tuned.toml is not valid TOML: %v\n%s", err, tuned)
	}
	s := blk["schedules"].(map[string]any)
	if len(s) != 1 || s[prog] == nil || len(blk) != 1 {
		t.Fatalf("tuned.toml holds %v, want only [schedules.%s]", blk, prog)
	}
	doc["schedules"].(map[string]any)[prog] = s[prog]
	var b bytes.Buffer
	if err := toml.NewEncoder(&b).Encode(doc); err != nil {
		t.Fatal(err)
	}
	c, err := cases.Parse("pasted.toml", b.Bytes(), testkit.TuneDir)
	if err != nil {
		t.Fatalf("the case with the tuned program does not load: %v\n%s", err, b.Bytes())
	}
	return c
}

// TestTuneRecommendationMeetsCriteria: every recommended program, pasted
// into the case and run again from scratch, meets every criterion and has
// the cycle time reported.
func TestTuneRecommendationMeetsCriteria(t *testing.T) {
	for _, tc := range []struct {
		name string
		free []Free
	}{
		{"defaults", nil},
		{"wide", mustFree(t, "schedules.oven.segments.0.to=80C:160C", "schedules.oven.segments.1.hold=2min:120min",
			"schedules.oven.segments.0.ramp=5C/min:15C/min")},
	} {
		t.Run(tc.name, func(t *testing.T) {
			res := runTune(t, "three", "", Options{Program: "oven", Free: tc.free, Jobs: 2, Seed: 2})
			if res.Best == nil {
				t.Fatal("no feasible program")
			}
			dir := t.TempDir()
			if err := Write(dir, res); err != nil {
				t.Fatal(err)
			}
			tuned, err := os.ReadFile(filepath.Join(dir, TunedFile))
			if err != nil {
				t.Fatal(err)
			}
			c := tunedCase(t, testkit.TuneCase(t, "three", ""), tuned, "oven")
			r, err := solverRunForTest(c)
			if err != nil {
				t.Fatal(err)
			}
			for _, v := range results.Judge(c, r) {
				if !v.Pass {
					t.Errorf("re-run of the tuned program fails %s: %v against %v\n%s", v.Name, v.Value, v.Limit, tuned)
				}
			}
			s := c.Schedules["oven"]
			if end := s.End(); math.Abs(end-res.Best.Cycle) > 1e-6 || c.Problem.End != end {
				t.Errorf("re-run: program ends at %v s, run ends at %v s; tune reported %v s", end, c.Problem.End, res.Best.Cycle)
			}
			if res.Own == nil || !(res.Best.Cycle < res.Own.Cycle) {
				t.Errorf("no saving against the case's own program: %+v", res.Own)
			}
		})
	}
}

// TestTuneRobust: with zero spreads the robust tuning is the plain one;
// with spreads its cycle is no shorter and meets the required share.
func TestTuneRobust(t *testing.T) {
	free := mustFree(t, "schedules.oven.segments.1.hold=5min:120min")
	plain := runTune(t, "hold", "", Options{Program: "oven", Free: free, Jobs: 2})
	zero := runTune(t, "hold", "[uncertainty]\n\"top.h\" = \"±0 %\"\n\"materials.tune-resin.cure.E1\" = \"±0 kJ/mol\"\n",
		Options{Program: "oven", Free: free, Jobs: 2, Robust: 3})
	if plain.Best == nil || zero.Best == nil {
		t.Fatal("no feasible program")
	}
	if plain.Best.Cycle != zero.Best.Cycle || strings.Join(plain.Best.Values, ",") != strings.Join(zero.Best.Values, ",") {
		t.Errorf("zero spreads: robust %v (%v s), plain %v (%v s)", zero.Best.Values, zero.Best.Cycle, plain.Best.Values, plain.Best.Cycle)
	}
	spread := runTune(t, "hold", "[uncertainty]\n\"top.h\" = \"±30 %\"\n\"materials.tune-resin.cure.E1\" = { spread = \"±1 kJ/mol\", distribution = \"normal\" }\nshare = 0.9\n",
		Options{Program: "oven", Free: free, Jobs: 2, Robust: 10})
	if spread.Best == nil {
		t.Fatal("robust: no feasible program")
	}
	if spread.Best.Cycle < plain.Best.Cycle {
		t.Errorf("robust cycle %v s is shorter than the nominal %v s", spread.Best.Cycle, plain.Best.Cycle)
	}
	t.Logf("nominal %v s, robust %v s", plain.Best.Cycle, spread.Best.Cycle)
	// 0.9 of 10 samples: 9 must meet the criteria.
	if spread.Best.ShareMet < 0.9 || spread.Best.Runs != 10 {
		t.Errorf("robust best meets the criteria in %v of %d runs, want at least 0.9 of 10", spread.Best.ShareMet, spread.Best.Runs)
	}
	// The criterion values under --robust say which sample they are.
	var out strings.Builder
	if err := Print(&out, spread); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(out.String(), "each criterion's value is the one that 9 of the 10 samples meet or better") {
		t.Errorf("the robust criterion values do not say what they are:\n%s", out.String())
	}
}

// TestTuneDeterministic: the same seed gives the same candidates and the
// same answer, whatever the number of jobs.
func TestTuneDeterministic(t *testing.T) {
	var outs [2][2][]byte
	for i, jobs := range []int{1, 3} {
		res := runTune(t, "three", "", Options{Program: "oven", Jobs: jobs, Seed: 7})
		dir := t.TempDir()
		if err := Write(dir, res); err != nil {
			t.Fatal(err)
		}
		for k, f := range []string{TuneFile, TunedFile} {
			b, err := os.ReadFile(filepath.Join(dir, f))
			if err != nil {
				t.Fatal(err)
			}
			outs[i][k] = b
		}
	}
	for k, f := range []string{TuneFile, TunedFile} {
		if !bytes.Equal(outs[0][k], outs[1][k]) {
			t.Errorf("%s differs between -j 1 and -j 3", f)
		}
	}
}

func TestTuneExplicitEnd(t *testing.T) {
	// The case ends 10 min after its program (97.7 min): the tuned runs keep
	// those 10 min.
	text := strings.Replace(string(testkit.TuneCase(t, "hold", "")), "[time]\n", "[time]\nend = \"107.7 min\"\n", 1)
	res, err := Tune(context.Background(), "hold.toml", []byte(text), testkit.TuneDir,
		Options{Program: "oven", Free: mustFree(t, "schedules.oven.segments.1.hold=5min:120min"), Jobs: 2})
	if err != nil {
		t.Fatal(err)
	}
	// Source: analytic, 107.7 min − (7.7 + 90) min = 600 s.
	if math.Abs(res.EndOffset-600) > 1e-6 || res.Best == nil || math.Abs(res.Best.End-res.Best.Cycle-600) > 1e-6 {
		t.Errorf("end offset %v, best %+v", res.EndOffset, res.Best)
	}
	var b bytes.Buffer
	Print(&b, res)
	if !strings.Contains(b.String(), "set it to") {
		t.Errorf("the printout does not say how to set time.end:\n%s", b.String())
	}
}

func TestTuneErrors(t *testing.T) {
	for _, tc := range []struct {
		name, extra string
		opt         Options
		want        string
		is          error
	}{
		{"no program", "", Options{}, "--program NAME", ErrTune},
		{"unknown program", "", Options{Program: "ovne"}, `did you mean "oven"?`, ErrTune},
		{"drives nothing", "[schedules.spare]\nstart = \"23 C\"\nsegments = [{ hold = \"1 h\" }]\n", Options{Program: "spare"}, "drives nothing", ErrTune},
		{"free outside", "", Options{Program: "oven", Free: []Free{{Key: "top.h", From: "10 W/m^2/K", To: "20 W/m^2/K"}}}, "only values of the tuned program", ErrTune},
		{"free unknown", "", Options{Program: "oven", Free: []Free{{Key: "schedules.oven.segments.5.hold", From: "1 h", To: "2 h"}}}, "no element", ErrTune},
		{"free dimension", "", Options{Program: "oven", Free: []Free{{Key: "schedules.oven.segments.1.hold", From: "1 C", To: "2 C"}}}, "is a time", ErrTune},
		{"free twice", "", Options{Program: "oven", Free: []Free{{Key: "schedules.oven.segments.1.hold", From: "1 h", To: "2 h"}, {Key: "schedules.oven.segments.1.hold", From: "1 h", To: "3 h"}}}, "the same value", ErrTune},
		{"robust without uncertainty", "", Options{Program: "oven", Robust: 3}, "[uncertainty]", uncertain.ErrNoUncertainty},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Tune(context.Background(), "hold.toml", testkit.TuneCase(t, "hold", tc.extra), testkit.TuneDir, tc.opt)
			if err == nil || !strings.Contains(err.Error(), tc.want) || !errors.Is(err, tc.is) {
				t.Errorf("got %v, want an error %v containing %q", err, tc.is, tc.want)
			}
		})
	}
	noCrit := strings.Replace(string(testkit.TuneCase(t, "hold", "")), "[criteria]\nmin_cure = 0.9", "", 1)
	if _, err := Tune(context.Background(), "hold.toml", []byte(noCrit), testkit.TuneDir, Options{Program: "oven"}); err == nil || !strings.Contains(err.Error(), "no [criteria]") {
		t.Errorf("no criteria: got %v", err)
	}
	early := strings.Replace(string(testkit.TuneCase(t, "hold", "")), "[time]\n", "[time]\nend = \"30 min\"\n", 1)
	if _, err := Tune(context.Background(), "hold.toml", []byte(early), testkit.TuneDir, Options{Program: "oven"}); err == nil || !strings.Contains(err.Error(), "ends before program") {
		t.Errorf("time.end before the program's end: got %v", err)
	}
	points := strings.Replace(string(testkit.TuneCase(t, "hold", "")), "start = \"23 C\"\nsegments = [\n  { ramp = \"10 C/min\", to = \"100 C\" },\n  { hold = \"90 min\" },\n]",
		"points = [[\"0 min\", \"23 C\"], [\"10 min\", \"100 C\"], [\"90 min\", \"100 C\"]]", 1)
	if _, err := Tune(context.Background(), "hold.toml", []byte(points), testkit.TuneDir, Options{Program: "oven"}); err == nil || !strings.Contains(err.Error(), "--free schedules.oven.points") {
		t.Errorf("points without --free: got %v", err)
	}
	// With --free, a program given by points can be tuned: its last time is
	// the cycle.
	res, err := Tune(context.Background(), "hold.toml", []byte(points), testkit.TuneDir,
		Options{Program: "oven", Free: mustFree(t, "schedules.oven.points.2.0=20min:120min")})
	if err != nil || res.Best == nil {
		t.Fatalf("points with --free: %v", err)
	}
	if !strings.Contains(res.Block, "points = [") {
		t.Errorf("block of a points program:\n%s", res.Block)
	}
}

func TestParseFree(t *testing.T) {
	f, err := ParseFree("schedules.oven.segments.1.hold=30min:3h")
	if err != nil || f.Key != "schedules.oven.segments.1.hold" || f.From != "30 min" || f.To != "3 h" {
		t.Errorf("ParseFree: %+v, %v", f, err)
	}
	for _, bad := range []string{"schedules.oven.segments.1.hold", "=1h:2h", "k=1h", "k=1h:2h:3h", "k=1h:2C", "k=:2h", "a b=1h:2h"} {
		if _, err := ParseFree(bad); err == nil || !errors.Is(err, ErrTune) || !strings.HasPrefix(err.Error(), "--free ") {
			t.Errorf("ParseFree(%q): %v, want a --free error", bad, err)
		}
	}
}

func TestTuneDefaultRanges(t *testing.T) {
	v, c, err := cases.NewCaseVariant("three.toml", testkit.TuneCase(t, "three", ""), testkit.TuneDir)
	if err != nil {
		t.Fatal(err)
	}
	_ = c
	tu := &tuner{v: v, prog: "oven"}
	if err := tu.defaultFree(); err != nil {
		t.Fatal(err)
	}
	// Source: the README's Case file reference (±50 %); the hold temperature within ±50 % of the
	// 77 K its ramp climbs from 23 C (analytic: 100 ± 38.5 C). The last
	// ramp feeds no hold: its to stays.
	want := [][3]string{
		{"schedules.oven.segments.0.ramp", "5 C/min", "15 C/min"},
		{"schedules.oven.segments.0.to", "61.5 C", "138.5 C"},
		{"schedules.oven.segments.1.hold", "45 min", "135 min"},
		{"schedules.oven.segments.2.ramp", "-7.5 C/min", "-2.5 C/min"},
	}
	if len(tu.vars) != len(want) {
		t.Fatalf("%d free values, want %d", len(tu.vars), len(want))
	}
	for i, w := range want {
		g := tu.vars[i]
		if g.Key != w[0] || g.From != w[1] || g.To != w[2] || math.Abs(g.own-0.5) > 1e-12 {
			t.Errorf("free %d: %s %s .. %s (case at %v), want %v at 0.5", i, g.Key, g.From, g.To, g.own, w)
		}
	}
}

func TestTunePrint(t *testing.T) {
	res := runTune(t, "hold", "", Options{Program: "oven", Free: mustFree(t, "schedules.oven.segments.1.hold=5min:120min"), Jobs: 2})
	var b bytes.Buffer
	if err := Print(&b, res); err != nil {
		t.Fatal(err)
	}
	for _, s := range []string{"cycle time", "saving", "criterion min_cure", "limiting criterion: min_cure"} {
		if !strings.Contains(b.String(), s) {
			t.Errorf("printout lacks %q:\n%s", s, b.String())
		}
	}
	dir := t.TempDir()
	if err := Write(dir, res); err != nil {
		t.Fatal(err)
	}
	csvb, _ := os.ReadFile(filepath.Join(dir, TuneFile))
	lines := strings.Split(strings.TrimSpace(string(csvb)), "\n")
	if lines[0] != "candidate,phase,schedules.oven.segments.1.hold,cycle_time_s,time_end_s,min_cure,min_cure_margin,share_met,feasible,status,error" ||
		len(lines) != len(res.Candidates)+1 || !strings.HasPrefix(lines[1], "0,case,90 min,") {
		t.Errorf("tune.csv:\n%s", strings.Join(lines[:min(3, len(lines))], "\n"))
	}
	// No feasible program in the range: no tuned.toml, and the printout says so.
	res = runTune(t, "hold", "", Options{Program: "oven", Free: mustFree(t, "schedules.oven.segments.1.hold=1min:10min"), Jobs: 2})
	if res.Best != nil || res.Closest == nil {
		t.Fatalf("1 to 10 min: best %+v, closest %+v", res.Best, res.Closest)
	}
	dir = t.TempDir()
	if err := Write(dir, res); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(dir, TunedFile)); err == nil {
		t.Errorf("tuned.toml written without a feasible program")
	}
	b.Reset()
	Print(&b, res)
	if !strings.Contains(b.String(), "NO PROGRAM") {
		t.Errorf("printout:\n%s", b.String())
	}
}
