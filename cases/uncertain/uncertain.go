package uncertain

import (
	"bytes"
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/internal/textout"
	"cureslab/cases/results"
	"cureslab/solver"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"sync"
	"text/tabwriter"
	"time"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distmv"
	"gonum.org/v1/gonum/stat/samplemv"
)

// uncertaintyFile is the table of the samples of `run --uncertain`.
const uncertaintyFile = "uncertainty.csv"

// ErrNoUncertainty is wrapped by the error of Propagate or Tune with
// Robust > 0 on a case without [uncertainty].
var ErrNoUncertainty = errors.New("the case declares no [uncertainty]")

// Limits on the number of samples, so that a typo cannot ask for hours.
const maxUncertainSamples = 100_000

// Options say how to run Propagate. Samples is required; the zero
// value of the other fields is the default.
type Options struct {
	Samples int    // N ≥ 1 Latin-hypercube samples of the declared spreads
	Seed    uint64 // seed of the sampler; 0 means 1
	// Jobs is the number of runs at a time; 0 means runtime.NumCPU().
	Jobs int
	// Progress, when not nil, gets one line updated in place (\r): samples
	// done of total. Pass a terminal only.
	Progress io.Writer
}

// Run is one run of Propagate.
type Run struct {
	Values  []string        // the uncertain values of this sample as they went into the case
	Summary results.Summary // its summary; Status is StatusFailed with Message when the case was invalid
	Err     string          // why the run failed or stopped early, "" when it ran to the end
	Note    string          // what the sample changed beyond its values (Case.Notes), "" if nothing
	ran     bool            // the solver ran (the summary holds its values)
}

// FieldSpread gives the spread of one summary field over the samples that
// ran to the end: its 5 %, 50 % and 95 % values (Quantile, rounded to 12
// significant digits so that the interpolation adds no binary noise).
type FieldSpread struct {
	Name         string  // as in summary.json
	P5, P50, P95 float64 // NaN when N = 0
	Min, Max     float64 // NaN when N = 0
	N            int     // samples with a value
}

// CriterionShare is the share of all samples that met one criterion; a
// sample that ran away or failed meets none.
type CriterionShare struct {
	Name  string
	Limit float64 // as in summary.json
	Share float64 // in [0, 1]
}

// Report is the outcome of Propagate: every sample, and the
// spread of each summary field and the share of samples meeting each
// criterion (README, Case file reference).
type Report struct {
	Samples  int
	Seed     uint64
	Share    float64 // required share, from [uncertainty] share
	Inputs   []cases.UncertainInput
	Runs     []Run            // in sample order
	Fields   []FieldSpread    // in the order of summary.csv (sweepColumns)
	Criteria []CriterionShare // in the order of the case's criteria
	// AllMet is the share of samples that met every criterion (1 when the
	// case has none and every run ran to the end).
	AllMet float64
	// Runaway and Failed count the samples that ran away or failed (an
	// invalid sample case counts as failed).
	Runaway, Failed int
}

// Pass reports whether the required share of samples met every criterion.
func (r *Report) Pass() bool { return r.AllMet >= r.Share-1e-12 }

// Judge returns the nominal summary s judged with the samples of
// rep as well: one more verdict, uncertainty_share (value: the share of
// samples that met every criterion; limit: the required share), and the
// status "criteria-failed" when that verdict fails and the nominal run was
// "ok". summary.json, the terminal, the report and the exit status then
// agree: a run whose samples fall short of the share has failed a
// criterion, however its nominal values look.
func Judge(s results.Summary, rep *Report) results.Summary {
	v := results.Verdict{Name: results.CriterionShareMet, Value: num.RoundSig(rep.AllMet), Limit: rep.Share, Pass: rep.Pass()}
	out := s
	out.Criteria = append(append(results.Verdicts{}, s.Criteria...), v)
	if !v.Pass && s.Status == results.StatusOK {
		out.Status = results.StatusCriteriaFailed
	}
	return out
}

// LhsPoints returns n Latin-hypercube points in [0, 1)^k: gonum's
// samplemv.LatinHypercube on the unit cube with a PCG source seeded with
// (seed, 0), so that the same seed gives the same points (McKay, Beckman &
// Conover, Technometrics 21(2), 1979: one point in each of the n equal
// strata of every coordinate). Cost O(n·k).
func LhsPoints(n, k int, seed uint64) *mat.Dense {
	u := mat.NewDense(n, max(k, 1), nil)
	if k > 0 {
		samplemv.LatinHypercube{Q: distmv.NewUnitUniform(k, nil), Src: rand.NewPCG(seed, 0)}.Sample(u)
	}
	return u
}

// Propagate runs N Latin-hypercube samples of the spreads declared in the
// [uncertainty] section of the case c, whose file text is data (c is
// Parse(c.File, data, c.Dir)); the program and everything else stay as
// written.
//
// Method: N points u in [0, 1)^k (lhsPoints, seed opt.Seed), one
// coordinate per uncertain input; sample i puts each input at
// nominal + w·(2u − 1) (uniform) or nominal + (w/2)·Φ⁻¹(u) (normal, the
// spread w is 2σ; Φ⁻¹ is gonum's distuv.UnitNormal.Quantile, the
// inverse-CDF transform of the stratified uniform sample), validates the
// changed case with the normal loader (an invalid sample, such as a
// negative thickness, fails with the loader's message) and runs it with
// solver.Run. opt.Jobs runs go at a time; the result does not depend on
// Jobs. The spreads of the summary fields use the runs that ended "ok" or
// "criteria-failed"; the shares count every sample.
//
// Errors: a case without [uncertainty] (ErrNoUncertainty), N < 1 or too
// large. Cancelling ctx stops the runs and returns ctx's error. Cost: N
// solver runs.
func Propagate(ctx context.Context, c *cases.Case, data []byte, opt Options) (*Report, error) {
	return uncertain(ctx, c, data, opt)
}

// Check returns the error Propagate would return for c (loaded from
// data) before running anything: no [uncertainty], or a bad one. Commands
// call it before they write outputs.
func Check(c *cases.Case, data []byte) error {
	_, _, err := uncertainOf(c, data)
	return err
}

// uncertainOf returns the case variant of data and its declared spreads.
func uncertainOf(c *cases.Case, data []byte) (*cases.CaseVariant, *cases.Uncertainty, error) {
	v, _, err := cases.NewCaseVariant(c.File, data, c.Dir)
	if err != nil {
		return nil, nil, err
	}
	unc, err := cases.ReadUncertainty(v.Name, v.Text, v.Doc)
	if err != nil {
		return nil, nil, err
	}
	if unc == nil || len(unc.Inputs) == 0 {
		return nil, nil, fmt.Errorf("%s: %w: add one, for example\n[uncertainty]\n\"top.h\" = \"±20 %%\"", c.File, ErrNoUncertainty)
	}
	return v, unc, nil
}

func uncertain(ctx context.Context, c *cases.Case, data []byte, opt Options) (*Report, error) {
	if opt.Samples < 1 || opt.Samples > maxUncertainSamples {
		return nil, fmt.Errorf("--uncertain wants between 1 and %d samples, got %d", maxUncertainSamples, opt.Samples)
	}
	if opt.Jobs < 0 {
		return nil, fmt.Errorf("-j %d: want at least 1 job", opt.Jobs)
	}
	v, unc, err := uncertainOf(c, data)
	if err != nil {
		return nil, err
	}
	seed := opt.Seed
	if seed == 0 {
		seed = 1
	}
	n := opt.Samples
	rep := &Report{Samples: n, Seed: seed, Share: unc.Share, Inputs: unc.Inputs, Runs: make([]Run, n)}
	pts := LhsPoints(n, len(unc.Inputs), seed)
	prog := &Progress{W: opt.Progress, What: "samples", total: n}
	err = forEach(ctx, n, opt.Jobs, func(i int) {
		rep.Runs[i] = runSample(ctx, v, unc, pts.RawRowView(i)[:len(unc.Inputs)])
		prog.add(1)
	})
	prog.Finish()
	if err != nil {
		return nil, err
	}
	rep.summarize(c)
	return rep, nil
}

// runSample runs one sample of a study.
func runSample(ctx context.Context, v *cases.CaseVariant, unc *cases.Uncertainty, us []float64) Run {
	t := v.Tree(nil)
	shown, err := Sample(unc, t, us)
	if err != nil {
		return Run{Values: make([]string, len(us)), Summary: results.Summary{Status: results.StatusFailed, Message: err.Error()}, Err: err.Error()}
	}
	c, err := v.Parse(t)
	if err != nil {
		msg := cases.FlattenErrors(err)
		return Run{Values: shown, Summary: results.Summary{Status: results.StatusFailed, Message: msg}, Err: msg}
	}
	c.Problem.NoFields = true // the sample needs its summary only
	r, err := solver.Run(ctx, c.Problem)
	if err != nil {
		return Run{Values: shown, Summary: results.Summary{Title: c.Title, Status: results.StatusFailed, Message: err.Error()}, Err: err.Error()}
	}
	s := results.Summarize(c, r)
	msg := ""
	if r.Status != solver.OK {
		msg = s.Message
	}
	return Run{Values: shown, Summary: s, Err: msg, Note: strings.Join(c.Notes, "; "), ran: true}
}

// forEach calls f(i) for i in [0, n) on jobs goroutines (0: all cores) and
// returns ctx's error if it was cancelled before every call was made.
func forEach(ctx context.Context, n, jobs int, f func(i int)) error {
	if jobs == 0 {
		jobs = runtime.NumCPU()
	}
	work := make(chan int)
	var wg sync.WaitGroup
	for range min(jobs, n) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range work {
				f(i)
			}
		}()
	}
	var err error
feed:
	for i := range n {
		select {
		case work <- i:
		case <-ctx.Done():
			err = ctx.Err()
			break feed
		}
	}
	close(work)
	wg.Wait()
	if err == nil {
		err = ctx.Err()
	}
	return err
}

// summarize fills the field spreads and the criterion shares.
func (r *Report) summarize(c *cases.Case) {
	for _, s := range r.Runs {
		switch s.Summary.Status {
		case results.StatusRunaway:
			r.Runaway++
		case results.StatusFailed:
			r.Failed++
		}
	}
	for _, col := range results.SweepColumns {
		var xs []float64
		for i := range r.Runs {
			s := &r.Runs[i].Summary
			if s.Status != results.StatusOK && s.Status != results.StatusCriteriaFailed {
				continue
			}
			if x, err := strconv.ParseFloat(col.Get(s), 64); err == nil && !math.IsNaN(x) {
				xs = append(xs, x)
			}
		}
		f := FieldSpread{Name: col.Name, N: len(xs), P5: math.NaN(), P50: math.NaN(), P95: math.NaN(), Min: math.NaN(), Max: math.NaN()}
		if len(xs) > 0 {
			slices.Sort(xs)
			f.P5, f.P50, f.P95 = round12(Quantile(0.05, xs)), round12(Quantile(0.5, xs)), round12(Quantile(0.95, xs))
			f.Min, f.Max = xs[0], xs[len(xs)-1]
		}
		r.Fields = append(r.Fields, f)
	}
	all := 0
	limits := CriteriaOf(c)
	met := make([]int, len(limits))
	for i := range r.Runs {
		s := &r.Runs[i].Summary
		if s.Status != results.StatusOK && s.Status != results.StatusCriteriaFailed {
			continue
		}
		if s.Status == results.StatusOK {
			all++
		}
		for j, want := range limits {
			for _, v := range s.Criteria {
				if v.Name == want.Name && v.Pass {
					met[j]++
				}
			}
		}
	}
	for j, v := range limits {
		r.Criteria = append(r.Criteria, CriterionShare{Name: v.Name, Limit: v.Limit, Share: float64(met[j]) / float64(r.Samples)})
	}
	r.AllMet = float64(all) / float64(r.Samples)
}

// round12 rounds x to 12 significant digits.
func round12(x float64) float64 {
	y, err := strconv.ParseFloat(strconv.FormatFloat(x, 'g', 12, 64), 64)
	if err != nil {
		return x
	}
	return y
}

// CriteriaOf returns the criteria that c sets, with their limits in the
// units of summary.json and no value.
func CriteriaOf(c *cases.Case) []results.Verdict {
	var out []results.Verdict
	if cr := c.Criteria; !math.IsNaN(cr.MinCure) {
		out = append(out, results.Verdict{Name: results.CriterionMinCure, Limit: cr.MinCure})
	}
	if cr := c.Criteria; !math.IsNaN(cr.MaxTemperature) {
		out = append(out, results.Verdict{Name: results.CriterionMaxTemperature, Limit: num.Celsius(cr.MaxTemperature)})
	}
	if cr := c.Criteria; !math.IsNaN(cr.MaxSpread) {
		out = append(out, results.Verdict{Name: results.CriterionMaxSpread, Limit: num.Round6(cr.MaxSpread)})
	}
	return out
}

// Quantile returns the p-quantile of the sorted sample x (Hyndman & Fan,
// "Sample quantiles in statistical packages", The American Statistician
// 50(4), 1996, definition 7, the default of R and NumPy):
//
//	h = (n − 1)·p,  Q(p) = x[⌊h⌋] + (h − ⌊h⌋)·(x[⌊h⌋+1] − x[⌊h⌋])
//
// x must be sorted in increasing order and not empty, and p in [0, 1]; it
// panics otherwise. Cost O(1).
func Quantile(p float64, x []float64) float64 {
	if len(x) == 0 || !(p >= 0 && p <= 1) {
		panic(fmt.Sprintf("uncertain: Quantile(%v) of %d values", p, len(x)))
	}
	h := float64(len(x)-1) * p
	i := int(math.Floor(h))
	if i >= len(x)-1 {
		return x[len(x)-1]
	}
	return x[i] + (h-float64(i))*(x[i+1]-x[i])
}

// uncertaintyJSON is the "uncertainty" object of summary.json.
type uncertaintyJSON struct {
	Samples       int                   `json:"samples"`
	Seed          uint64                `json:"seed"`
	ShareRequired float64               `json:"share_required"`
	Inputs        []uncertainInputJSON  `json:"inputs"`
	Fields        object[fieldJSON]     `json:"fields"`
	Criteria      object[criterionJSON] `json:"criteria"`
	AllCriteria   results.Float         `json:"all_criteria_share"`
	Pass          bool                  `json:"pass"`
	Runaway       int                   `json:"runaway_samples"`
	Failed        int                   `json:"failed_samples"`
}

type uncertainInputJSON struct {
	Key          string `json:"key"`
	Spread       string `json:"spread"`
	Distribution string `json:"distribution"`
}

type fieldJSON struct {
	P5  results.Float `json:"p5"`
	P50 results.Float `json:"p50"`
	P95 results.Float `json:"p95"`
	N   int           `json:"samples"`
}

type criterionJSON struct {
	Limit results.Float `json:"limit"`
	Share results.Float `json:"share"`
}

// object is a JSON object whose keys keep the order of the slice.
type object[T any] []struct {
	key string
	val T
}

func (o object[T]) MarshalJSON() ([]byte, error) {
	var b strings.Builder
	b.WriteByte('{')
	for i, e := range o {
		if i > 0 {
			b.WriteByte(',')
		}
		k, err := json.Marshal(e.key)
		if err != nil {
			return nil, err
		}
		v, err := json.Marshal(e.val)
		if err != nil {
			return nil, err
		}
		b.Write(k)
		b.WriteByte(':')
		b.Write(v)
	}
	b.WriteByte('}')
	return []byte(b.String()), nil
}

func (r *Report) jsonObject() uncertaintyJSON {
	u := uncertaintyJSON{Samples: r.Samples, Seed: r.Seed, ShareRequired: r.Share, AllCriteria: results.Float(r.AllMet),
		Pass: r.Pass(), Runaway: r.Runaway, Failed: r.Failed, Inputs: []uncertainInputJSON{}}
	for _, in := range r.Inputs {
		u.Inputs = append(u.Inputs, uncertainInputJSON{in.Key, in.Spread, in.Distribution})
	}
	for _, f := range r.Fields {
		u.Fields = append(u.Fields, struct {
			key string
			val fieldJSON
		}{f.Name, fieldJSON{results.Float(f.P5), results.Float(f.P50), results.Float(f.P95), f.N}})
	}
	for _, c := range r.Criteria {
		u.Criteria = append(u.Criteria, struct {
			key string
			val criterionJSON
		}{c.Name, criterionJSON{results.Float(c.Limit), results.Float(c.Share)}})
	}
	return u
}

// Write writes the results of Propagate into the output
// directory dir of the nominal run (README, Case file reference): uncertainty.csv, one row per
// sample (the sample index, the uncertain values as they went into the
// case, then the columns of a sweep's summary.csv: the summary fields,
// <criterion>_pass, status, error), and summary.json again: the nominal
// summary with one more key, "uncertainty", holding the inputs, for each
// summary field its p5, p50 and p95 values and the number of samples they
// come from, for each criterion its limit and the share of samples that met
// it, all_criteria_share, share_required, pass, and the numbers of runaway
// and failed samples. The summary.json that the nominal run wrote in dir is
// kept key for key, its "status" and "criteria" replaced by nominal's (pass
// Judge's summary, so that they count the uncertainty_share
// verdict) and "uncertainty" added at the end; without one, nominal is
// written. Both files are written atomically
// (WriteFileAtomic); dir must exist.
func Write(dir string, nominal results.Summary, rep *Report) error {
	if err := textout.WriteFileAtomic(dir, uncertaintyFile, func(w io.Writer) error { return writeUncertaintyCSV(w, rep) }); err != nil {
		return fmt.Errorf("writing %s: %w", uncertaintyFile, err)
	}
	b, err := summaryWithUncertainty(filepath.Join(dir, results.SummaryFile), nominal, rep.jsonObject())
	if err == nil {
		err = textout.WriteFileAtomic(dir, results.SummaryFile, func(w io.Writer) error { _, err := w.Write(b); return err })
	}
	if err != nil {
		return fmt.Errorf("writing %s: %w", results.SummaryFile, err)
	}
	return nil
}

// summaryWithUncertainty returns summary.json with the key "uncertainty"
// set to u: the file at path as the run wrote it, keys and their order
// kept (an earlier "uncertainty" is replaced, "status" and "criteria" are
// nominal's), or, when there is no such file, nominal.
func summaryWithUncertainty(path string, nominal results.Summary, u uncertaintyJSON) ([]byte, error) {
	type member struct {
		key string
		raw json.RawMessage
	}
	var members []member
	data, err := os.ReadFile(path)
	if errors.Is(err, fs.ErrNotExist) {
		if data, err = json.Marshal(nominal); err != nil {
			return nil, err
		}
	} else if err != nil {
		return nil, err
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	if tok, err := dec.Token(); err != nil || tok != json.Delim('{') {
		return nil, fmt.Errorf("%s is not a JSON object", path)
	}
	for dec.More() {
		tok, err := dec.Token()
		if err != nil {
			return nil, fmt.Errorf("%s: %w", path, err)
		}
		var raw json.RawMessage
		if err := dec.Decode(&raw); err != nil {
			return nil, fmt.Errorf("%s: %w", path, err)
		}
		k, _ := tok.(string)
		switch k {
		case "uncertainty":
			continue
		case "status":
			raw, _ = json.Marshal(nominal.Status)
		case "criteria":
			if raw, err = json.Marshal(nominal.Criteria); err != nil {
				return nil, err
			}
		}
		members = append(members, member{k, raw})
	}
	raw, err := json.Marshal(u)
	if err != nil {
		return nil, err
	}
	members = append(members, member{"uncertainty", raw})
	var out bytes.Buffer
	out.WriteString("{\n")
	for i, m := range members {
		k, _ := json.Marshal(m.key)
		fmt.Fprintf(&out, "  %s: ", k)
		if err := json.Indent(&out, m.raw, "  ", "  "); err != nil {
			return nil, err
		}
		if i < len(members)-1 {
			out.WriteByte(',')
		}
		out.WriteByte('\n')
	}
	out.WriteString("}\n")
	return out.Bytes(), nil
}

// writeUncertaintyCSV writes uncertainty.csv.
func writeUncertaintyCSV(w io.Writer, rep *Report) error {
	keys := make([]string, len(rep.Inputs))
	for i, in := range rep.Inputs {
		keys[i] = in.Key
	}
	header := results.SweepHeader(keys)
	header[0] = "sample"
	cw := csv.NewWriter(w)
	cw.Write(header)
	for i, s := range rep.Runs {
		rec := append([]string{strconv.Itoa(i)}, s.Values...)
		if !s.ran { // the case was invalid or the solver could not start
			for range len(results.SweepColumns) + len(results.SweepCriteria) {
				rec = append(rec, "")
			}
		} else {
			for _, col := range results.SweepColumns {
				rec = append(rec, col.Get(&s.Summary))
			}
			for _, name := range results.SweepCriteria {
				pass := ""
				for _, v := range s.Summary.Criteria {
					if v.Name == name {
						pass = strconv.FormatBool(v.Pass)
					}
				}
				rec = append(rec, pass)
			}
		}
		rec = append(rec, s.Summary.Status, cases.OneLine(s.Err), cases.OneLine(s.Note))
		cw.Write(rec)
	}
	cw.Flush()
	return cw.Error()
}

// Print writes a short table of rep for a terminal: the inputs,
// the 5 %, 50 % and 95 % values of the headline summary fields, and the
// share of samples meeting each criterion against the required share.
func Print(w io.Writer, rep *Report) error {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "uncertainty: %d Latin-hypercube samples (seed %d) of\n", rep.Samples, rep.Seed)
	for _, in := range rep.Inputs {
		fmt.Fprintf(tw, "  %s\t%s\t%s\n", in.Key, in.Spread, in.Distribution)
	}
	fmt.Fprintf(tw, "  quantity\t5 %%\t50 %%\t95 %%\n")
	shown := map[string]bool{"peak_temperature_C": true, "overshoot_K": true, "max_spread_K": true,
		"min_final_cure": true, "mean_final_cure": true, "time_to_min_cure_s": true, "gel_time_last_s": true,
		"min_final_glass_transition_C": true}
	for _, f := range rep.Fields {
		if !shown[f.Name] || f.N == 0 {
			continue
		}
		q := results.Term(f.Name)
		fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\n", q.Label, q.Format(f.P5), q.Format(f.P50), q.Format(f.P95))
	}
	for _, c := range rep.Criteria {
		fmt.Fprintf(tw, "  criterion %s\tmet in %.1f %% of samples\n", c.Name, 100*c.Share)
	}
	verdict := "pass"
	if !rep.Pass() {
		verdict = "FAILED"
	}
	fmt.Fprintf(tw, "  every criterion\tmet in %.1f %% of samples (required %.1f %%)  %s\n", 100*rep.AllMet, 100*rep.Share, verdict)
	if rep.Runaway+rep.Failed > 0 {
		fmt.Fprintf(tw, "  %d samples ran away, %d failed (see %s)\n", rep.Runaway, rep.Failed, uncertaintyFile)
	}
	return tw.Flush()
}

// Progress draws "k/n what" on one line updated in place; nil w draws
// nothing.
type Progress struct {
	mu    sync.Mutex
	W     io.Writer
	What  string
	total int
	done  int
	extra string
	last  time.Time
}

func (p *Progress) add(k int) { p.AddWith(k, "") }

// AddWith counts k more done and shows extra after the count.
func (p *Progress) AddWith(k int, extra string) {
	if p == nil || p.W == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	p.done += k
	p.extra = extra
	if now := time.Now(); now.Sub(p.last) >= 100*time.Millisecond || p.done == p.total {
		p.last = now
		p.draw()
	}
}

func (p *Progress) draw() {
	if p.total > 0 {
		fmt.Fprintf(p.W, "\r%d/%d %s%s   ", p.done, p.total, p.What, p.extra)
	} else {
		fmt.Fprintf(p.W, "\r%d %s%s   ", p.done, p.What, p.extra)
	}
}

func (p *Progress) Finish() {
	if p == nil || p.W == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	p.draw()
	fmt.Fprintln(p.W)
}
