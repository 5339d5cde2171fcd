package calibrate

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"

	"cureslab/physics/lsq"
)

// Names of the files a calibration writes.
const (
	CalibratedFile  = "calibrated.toml"
	CalibrationFile = "calibration.csv"
	ResidualsFile   = "residuals.csv"
	ReportFile      = "report.html"
)

// csvNum writes v with 9 significant digits, "" for NaN and ±Inf.
func csvNum(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return ""
	}
	if v == 0 {
		return "0"
	}
	return strconv.FormatFloat(v, 'g', 9, 64)
}

// writeCalibrationCSV writes calibration.csv: one row per free value,
//
//	key,start,value,std_error,ci95_low,ci95_high,unit
//
// every number in the unit of the last column (the unit the case writes the
// value in; empty for a plain number); empty cells where the log does not
// determine a standard error or an interval.
func writeCalibrationCSV(w io.Writer, r *Result) error {
	cw := csv.NewWriter(w)
	cw.Write([]string{"key", "start", "value", "std_error", "ci95_low", "ci95_high", "unit"})
	for _, p := range r.Params {
		cw.Write([]string{p.Key, csvNum(p.Start), csvNum(p.Value), csvNum(p.SE), csvNum(p.Low), csvNum(p.High), p.Unit})
	}
	cw.Flush()
	return cw.Error()
}

// residualHeader returns the header of residuals.csv.
func residualHeader(l *Log) []string {
	h := []string{"time_s"}
	for _, p := range l.Probes {
		d := "T_" + p.Label + "mm"
		h = append(h, d+"_measured_C", d+"_simulated_C", d+"_residual_K")
	}
	return h
}

// writeResidualsCSV writes residuals.csv: time_s, then for each measured
// depth the measured and the fitted simulated temperature (°C) and the
// residual simulated − measured (K), at every time of the log; empty cells
// where the log has no reading (measured, residual) or the run did not
// reach (simulated, residual). Temperatures are rounded to 1e-4 K.
func writeResidualsCSV(w io.Writer, r *Result) error {
	cw := csv.NewWriter(w)
	cw.Write(residualHeader(r.Log))
	rec := make([]string, 0, 1+3*len(r.Log.Probes))
	round := func(v float64) string {
		if math.IsNaN(v) {
			return ""
		}
		s := strconv.FormatFloat(math.Round(v*1e4)/1e4, 'f', -1, 64)
		if s == "-0" {
			s = "0"
		}
		return s
	}
	for i, t := range r.Log.Times {
		rec = append(rec[:0], strconv.FormatFloat(t, 'f', -1, 64))
		for k, p := range r.Log.Probes {
			m, s := p.T[i], r.Fitted[k][i]
			rec = append(rec, round(m-273.15), round(s-273.15), round(s-m))
		}
		cw.Write(rec)
	}
	cw.Flush()
	return cw.Error()
}

// Shown returns the value, its standard error and its 95 % interval as
// text, to the decimals of two significant digits of the standard error
// (common practice for stating an uncertainty), or to four significant
// digits of the value when the standard error is not known; "—" for what
// the log does not determine, and "at a bound" as the interval of a value
// that ended on a bound of its range.
func (p Param) Shown() (value, se, interval string) {
	f := func(v float64) string { return strconv.FormatFloat(v, 'g', 4, 64) }
	if p.SE > 0 && !math.IsInf(p.SE, 0) {
		d := max(0, 1-int(math.Floor(math.Log10(p.SE))))
		f = func(v float64) string { return strconv.FormatFloat(v, 'f', d, 64) }
	}
	value, se, interval = f(p.Value), "—", "—"
	if !math.IsNaN(p.SE) {
		se = f(p.SE)
	}
	if !math.IsNaN(p.Low) && !math.IsNaN(p.High) {
		interval = f(p.Low) + " to " + f(p.High)
	}
	if p.AtBound {
		se, interval = "—", "at a bound"
	}
	return value, se, interval
}

// statusLine says how the fit ended.
func statusLine(r *Result) string {
	switch r.Status {
	case lsq.Converged:
		return fmt.Sprintf("converged after %d iterations (%d runs)", r.Iterations, r.Runs)
	case lsq.IterationLimit:
		return fmt.Sprintf("NOT CONVERGED after %d iterations (%d runs): the best point reached is shown", r.Iterations, r.Runs)
	case lsq.Interrupted:
		return fmt.Sprintf("INTERRUPTED after %d iterations (%d runs): the best point so far is shown", r.Iterations, r.Runs)
	}
	return r.Status.String()
}

// Print writes the terminal summary of a calibration: the status, a table
// of the free values (case value, fitted value, standard error, 95 %
// interval, unit), the RMS residual per depth and overall at the case's
// values and at the fitted ones, the correlations, and the warnings.
func Print(w io.Writer, r *Result) {
	fmt.Fprintf(w, "%d free value%s fitted to %s (%d thermocouple%s, %d readings): %s\n\n",
		len(r.Params), plural(len(r.Params)), r.Log.File, len(r.Log.Probes), plural(len(r.Log.Probes)), r.Readings, statusLine(r))
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "  free value\tcase\tfitted\tstd. error\t95 % interval\tunit")
	for _, p := range r.Params {
		v, se, iv := p.Shown()
		fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\t%s\t%s\n", p.Key, strconv.FormatFloat(p.Start, 'g', 6, 64), v, se, iv, unitOrDash(p.Unit))
	}
	tw.Flush()
	fmt.Fprintln(w)
	fmt.Fprintln(w, "RMS residual, simulated − measured (K)")
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "  depth\treadings\tat the case's values\tfitted")
	for k, p := range r.Log.Probes {
		fmt.Fprintf(tw, "  %s mm\t%d\t%.3f\t%.3f\n", p.Label, p.Readings(), r.StartRMS[k], r.RMS[k])
	}
	fmt.Fprintf(tw, "  all\t%d\t%.3f\t%.3f\n", r.Readings, r.StartRMSAll, r.RMSAll)
	tw.Flush()
	dof := "readings − free values"
	for _, p := range r.Params {
		if p.AtBound {
			dof = "readings − free values not on a bound"
		}
	}
	fmt.Fprintf(w, "\nresidual standard deviation %.3f K on %d degrees of freedom (%s)\n", r.Sigma, r.DoF, dof)
	if r.Corr != nil && len(r.Params) > 1 {
		// A value on a bound has no correlations (NaN): left out.
		var cs []string
		for i := range r.Params {
			for j := i + 1; j < len(r.Params); j++ {
				if c := r.Corr.At(i, j); !math.IsNaN(c) {
					cs = append(cs, fmt.Sprintf("%s – %s %+.2f", r.Params[i].Key, r.Params[j].Key, c))
				}
			}
		}
		if len(cs) > 0 {
			fmt.Fprintf(w, "correlations: %s\n", strings.Join(cs, "; "))
		}
	}
	for _, s := range r.Warnings {
		fmt.Fprintf(w, "warning: %s\n", s)
	}
}

func unitOrDash(u string) string {
	if u == "" {
		return "—"
	}
	return u
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}
