package calibrate

import (
	"context"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"cureslab/cases"
	"cureslab/cases/outdir"
	"cureslab/physics/lsq"
)

// Calibrate fits the free values of the case (the TOML text data of the
// file name; dir is the directory its relative paths refer to) so that its
// simulated temperatures match the measured log l at the log's depths and
// times:
//
//	minimise Σ_k Σ_i (T_sim(z_k, t_i; v) − T_meas(z_k, t_i))²  over the free values v,
//
// one term per reading (equal weights: every reading counts alike, so a
// thermocouple read more often weighs more, and a missing reading counts
// not at all), by Levenberg–Marquardt from the case's own values, with
// standard errors, 95 % intervals and correlations from the Jacobian at the
// optimum (lsq.Fit; Bates & Watts, Nonlinear Regression Analysis and Its
// Applications, 1988, ch. 2). Every evaluation is one summary-only solver
// run of the case with the free values written in (the key-path overrides
// of sweeps) and its output times set to the log's times (simulate); the
// Jacobian's runs go opt.Jobs at a time.
//
// Scales: film coefficients, contact resistances and rate constants are
// fitted on a logarithmic scale (their intervals are symmetric in ln), every
// other value on a linear scale divided by its start; bounds by
// transformation (lsq.Var).
//
// Errors, all before anything runs but the case at its own values: the
// case's own (cases.ErrorList), a --free that cannot be used (ErrFree), a
// log that does not fit the case (ErrLog: a depth outside the stack, a time
// outside the run), fewer readings than free values, a case that does not
// run at its own values. A fit that does not converge, or is interrupted
// through ctx, is not an error: the Result's Status says so and holds the
// best point reached.
//
// Cost: a few (typically 5 to 20) iterations, each one run for the trial
// step plus one per free value for the Jacobian after an accepted step.
func Calibrate(ctx context.Context, name string, data []byte, dir string, l *Log, free []Free, opt Options) (*Result, error) {
	v, c, err := cases.NewCaseVariant(name, data, dir)
	if err != nil {
		return nil, err
	}
	if err := l.Check(c.Problem.Mesh.Thickness(), c.Problem.End); err != nil {
		return nil, err
	}
	b, err := bind(v, free)
	if err != nil {
		return nil, err
	}
	r, err := run(ctx, l, b.problem, b.params, opt)
	if err != nil {
		return nil, err
	}
	r.CaseFile, r.Title = name, c.Title
	r.Scope.Volumetric = c.Problem.Volumetric != nil
	for _, m := range c.Problem.Materials {
		r.Scope.Curing = r.Scope.Curing || m.Cure != nil
	}
	r.Warnings = append(b.notes, r.Warnings...)
	if r.Calibrated, err = b.text(r); err != nil {
		return nil, err
	}
	return r, nil
}

// text returns the case text with the fitted values written in (6
// significant digits, in the unit the case writes each in) and a comment
// block at the top that says where they come from.
func (b *binding) text(r *Result) (string, error) {
	var edits []edit
	for i, p := range r.Params {
		lit := b.literal(i, p.Value, 6)
		s, ok := lit.(string)
		if ok {
			s = strconv.Quote(s)
		} else {
			s = strconv.FormatFloat(p.Value, 'g', 6, 64)
			if !strings.ContainsAny(s, ".eEn") {
				s += ".0" // a float, as the value may be fractional
			}
		}
		val, head := b.v.Positions(b.paths[i])
		switch {
		case val.Line > 0:
			edits = append(edits, edit{Line: val.Line, Col: val.Col, Key: p.Key, Lit: s, Comment: "calibrated"})
		case head.Line > 0:
			edits = append(edits, edit{Line: head.Line, Insert: true, Key: b.paths[i][len(b.paths[i])-1], Lit: s, Comment: "calibrated"})
		default:
			return "", fmt.Errorf("cannot write %s into %s: its table has no [header] line to add it under; add %s to the case and calibrate again", p.Key, CalibratedFile, p.Key)
		}
	}
	text, err := applyEdits(b.v.Text, edits)
	if err != nil {
		return "", fmt.Errorf("cannot write %s: %v", CalibratedFile, err)
	}
	return header(r) + text, nil
}

// header is the comment block at the top of calibrated.toml.
func header(r *Result) string {
	var s strings.Builder
	line := func(format string, a ...any) {
		s.WriteString(strings.TrimRight("# "+fmt.Sprintf(format, a...), " ") + "\n")
	}
	switch r.Status {
	case lsq.IterationLimit:
		line("NOT CONVERGED: the values below are the best point reached after %d iterations, not a fit.", r.Iterations)
	case lsq.Interrupted:
		line("INTERRUPTED: the values below are the best point reached so far, not a fit.")
	}
	line("Calibrated by cureslab against %s (%d thermocouples, %d readings):", r.Log.File, len(r.Log.Probes), r.Readings)
	for _, p := range r.Params {
		v, se, iv := p.Shown()
		start := strconv.FormatFloat(p.Start, 'g', 6, 64)
		unit := ""
		if p.Unit != "" {
			unit = " " + p.Unit
		}
		switch {
		case p.AtBound:
			line("  %s: %s -> %s%s (at a bound of its range; no standard error)", p.Key, start, v, unit)
		case math.IsNaN(p.SE):
			line("  %s: %s -> %s%s (no standard error)", p.Key, start, v, unit)
		case iv == "—":
			line("  %s: %s -> %s ± %s%s", p.Key, start, v, se, unit)
		default:
			line("  %s: %s -> %s ± %s%s (95 %%: %s)", p.Key, start, v, se, unit, iv)
		}
	}
	line("RMS residual %.3f K (%.3f K with the case's own values).", r.RMSAll, r.StartRMSAll)
	for _, w := range r.Warnings {
		line("warning: %s", w)
	}
	line("")
	return s.String()
}

// Kind is the output set of a calibration (package outdir).
var Kind = outdir.Register(outdir.Kind{Name: "calibration",
	Marks: []string{CalibrationFile, CalibratedFile},
	Names: []string{CalibratedFile, CalibrationFile, ResidualsFile, ReportFile}})

// StageFiles stages calibrated.toml, calibration.csv and residuals.csv in
// set; they go in place with the rest of the set at set.Commit (the report
// page is staged by the caller, from package report).
func StageFiles(set *outdir.Set, r *Result) error {
	if err := set.Stage(CalibratedFile, func(w io.Writer) error {
		_, err := io.WriteString(w, r.Calibrated)
		return err
	}); err != nil {
		return err
	}
	if err := set.Stage(CalibrationFile, func(w io.Writer) error { return writeCalibrationCSV(w, r) }); err != nil {
		return err
	}
	return set.Stage(ResidualsFile, func(w io.Writer) error { return writeResidualsCSV(w, r) })
}
