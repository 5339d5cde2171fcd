package dsc

import (
	"context"
	"errors"
	"fmt"
	"math"
)

// Options are the choices of Analyze. The zero value analyses without
// fitting a model.
type Options struct {
	Baseline Baseline
	Window   Window // dynamic scans only
	// Model is NthOrder, Autocatalytic or Isoconversional, or "" to fit none.
	Model     string
	Diffusion bool
	// Progress, if not nil, follows the fit (see FitSpec).
	Progress func(iter int, rms float64)
}

// Thresholds of Analyze's warnings.
const (
	// MinPrograms is the number of temperature programs below which the
	// ICTAC recommendations are not met (Vyazovkin et al. 2011: at least
	// three, preferably three to five).
	MinPrograms = 3
	// MinRateSpan is the smallest ratio of the highest to the lowest
	// heating rate that passes for ICTAC's "about a factor of 10".
	MinRateSpan = 8
	// MaxEaSpread is the spread of Friedman's E over α = 0.1 … 0.9, as
	// (max − min)/mean, above which the kinetics are likely multi-step
	// (ICTAC: "significant" variation; 20–30 % is the usual reading).
	MaxEaSpread = 0.25
	// StalledCure is the final degree of cure below which an isothermal
	// scan is taken to have vitrified.
	StalledCure = 0.97
)

// Analysis is the outcome of Analyze.
type Analysis struct {
	Curves []*Curve
	// TotalHeat is the heat of full cure, J/kg of sample: the mean over the
	// dynamic scans, or the largest isothermal heat if there are none.
	TotalHeat float64
	// HeatSD is the standard deviation of the dynamic scans' heats, J/kg
	// (NaN with fewer than two).
	HeatSD float64
	// Rates are the distinct heating rates of the dynamic scans, K/s,
	// increasing; Programs counts the distinct temperature programs
	// (heating rates and isotherms).
	Rates    []float64
	Programs int
	// Kissinger and OFW are nil when fewer than two heating rates were
	// given. OFW is at α = 0.5; OFWTable at the Friedman levels.
	Kissinger *Estimate
	OFW       *Estimate
	OFWTable  []IsoPoint
	Friedman  []IsoPoint
	// EaSpread is (max − min)/mean of the Friedman E over α = 0.1 … 0.9
	// (NaN without Friedman points).
	EaSpread float64
	Fit      *FitResult
	// FitRefused says why no model was fitted although one was asked for
	// ("" if it was fitted or not asked for).
	FitRefused string
	Warnings   []string
}

// Analyze processes every scan (Process), measures the isothermal scans
// against the total heat of the dynamic ones, computes the Kissinger,
// Ozawa–Flynn–Wall and Friedman activation energies and, if opt.Model is
// set, fits the model to all scans at once (Fit), started from the
// isoconversional estimate.
//
// It follows the ICTAC Kinetics Committee recommendations (Vyazovkin et
// al., Thermochim. Acta 520:1, 2011) and says so in Warnings: fewer than
// MinPrograms temperature programs; heating rates spanning less than a
// factor MinRateSpan; Friedman's E varying by more than MaxEaSpread over
// α = 0.1 … 0.9 (multi-step kinetics likely); and it refuses to fit a model
// to a single temperature program (FitRefused). Other warnings: each
// curve's notes, dynamic heats that disagree by more than 5 %, isothermal
// scans that stall below StalledCure without a diffusion factor, a poor or
// unconverged fit.
//
// Errors: the errors of every scan that cannot be processed, joined
// (errors.Join of *ScanError); nothing is analysed then. Cost: linear in
// the samples for the processing (Process), then dominated by the fit (see
// Fit).
func Analyze(scans []*Scan, opt Options) (*Analysis, error) {
	return AnalyzeContext(context.Background(), scans, opt)
}

// AnalyzeContext is Analyze that stops when ctx is cancelled: ctx is
// checked between scans, in the iterations of a sigmoidal baseline and
// before every iteration of the fit. Cancelled while processing the scans,
// it returns ctx.Err() and no analysis; cancelled during the fit, it
// returns the analysis without the fit (Fit nil, FitRefused saying so) and
// ctx.Err(), so that a caller can show what was computed.
func AnalyzeContext(ctx context.Context, scans []*Scan, opt Options) (*Analysis, error) {
	if len(scans) == 0 {
		return nil, errors.New("dsc: no scans")
	}
	curves, err := processAll(ctx, scans, opt)
	if err != nil {
		return nil, err
	}
	an := &Analysis{Curves: curves, HeatSD: math.NaN(), EaSpread: math.NaN()}
	var dyn, iso []*Curve
	for _, c := range an.Curves {
		if c.Program.Kind == Dynamic {
			dyn = append(dyn, c)
		} else {
			iso = append(iso, c)
		}
		for _, n := range c.Notes {
			an.warn("%s: %s", c.Scan.Name, n)
		}
	}
	an.measureHeat(dyn, iso, opt)
	an.checkPrograms(iso)
	an.isoconversional(dyn, iso)
	if opt.Model == "" {
		return an, nil
	}
	return an, an.fitModel(ctx, iso, opt)
}

// processAll processes every scan (see Process) with the baseline and
// window of opt. It returns ctx.Err() as soon as ctx is cancelled, else the
// errors of all the scans that cannot be processed, joined, else the curves
// in the order of scans.
func processAll(ctx context.Context, scans []*Scan, opt Options) ([]*Curve, error) {
	var curves []*Curve
	var errs []error
	for _, s := range scans {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		c, err := process(ctx, s, opt.Baseline, opt.Window)
		if ctx.Err() != nil {
			return nil, ctx.Err()
		}
		if err != nil {
			errs = append(errs, err)
			continue
		}
		curves = append(curves, c)
	}
	if len(errs) > 0 {
		return nil, errors.Join(errs...)
	}
	return curves, nil
}

// warn adds a formatted warning.
func (an *Analysis) warn(format string, a ...any) {
	an.Warnings = append(an.Warnings, fmt.Sprintf(format, a...))
}

// measureHeat sets the total heat of full cure and its spread, and
// normalises the isothermal curves by it:
//
//	TotalHeat = (1/k) Σ H_i,  HeatSD = √((Σ H_i² − (Σ H_i)²/k) / (k − 1))
//
// over the k dynamic heats H_i (the sample mean and standard deviation in
// one pass; the difference is clamped at 0 against rounding). Without a
// dynamic scan TotalHeat is the largest isothermal heat, a lower bound, and
// a warning says so. It warns when the dynamic heats range over more than
// 5 % of their mean, and when an isotherm stalls below StalledCure
// without a diffusion factor. Cost: linear in the scans and in the samples
// of the isothermal curves.
func (an *Analysis) measureHeat(dyn, iso []*Curve, opt Options) {
	if len(dyn) > 0 {
		var s, s2 float64
		for _, c := range dyn {
			s += c.Heat
			s2 += c.Heat * c.Heat
		}
		k := float64(len(dyn))
		an.TotalHeat = s / k
		if len(dyn) > 1 {
			an.HeatSD = math.Sqrt(max(s2-s*s/k, 0) / (k - 1))
			lo, hi := math.Inf(1), math.Inf(-1)
			for _, c := range dyn {
				lo, hi = min(lo, c.Heat), max(hi, c.Heat)
			}
			if (hi-lo)/an.TotalHeat > 0.05 {
				an.warn("the dynamic scans' heats range from %.4g to %.4g J/g (%.0f %%): check the baselines, the sample masses and the end of each scan",
					lo/1000, hi/1000, 100*(hi-lo)/an.TotalHeat)
			}
		}
	} else {
		for _, c := range iso {
			an.TotalHeat = max(an.TotalHeat, c.Heat)
		}
		an.warn("no dynamic scan: the total heat is the largest isothermal heat, a lower bound if any isotherm stopped short of full cure; add a dynamic scan to measure it")
	}
	for _, c := range iso {
		c.Normalize(an.TotalHeat)
		if af := c.Alpha[len(c.Alpha)-1]; af < StalledCure && !opt.Diffusion && opt.Model != Isoconversional {
			an.warn("%s: the cure stops at α = %.3f at %.4g C (vitrification?): the model without --diffusion cannot follow it", c.Scan.Name, af, c.Program.Temperature-273.15)
		}
	}
}

// checkPrograms sets Rates and Programs and warns where the temperature
// programs fall short of the ICTAC recommendations (Vyazovkin et al.,
// Thermochim. Acta 520:1, 2011): fewer than MinPrograms programs, heating
// rates spanning less than a factor MinRateSpan, or a rate above 25 K/min
// (thermal lag; common practice).
func (an *Analysis) checkPrograms(iso []*Curve) {
	an.Rates = distinctRates(an.Curves)
	an.Programs = len(an.Rates) + countIsotherms(iso)
	if an.Programs < MinPrograms {
		an.warn("only %d temperature program(s): the ICTAC Kinetics Committee recommends at least %d, preferably 3 to 5 heating rates (Vyazovkin et al. 2011)", an.Programs, MinPrograms)
	}
	if len(an.Rates) >= 2 {
		if span := an.Rates[len(an.Rates)-1] / an.Rates[0]; span < MinRateSpan {
			an.warn("the heating rates span a factor %.2g only; ICTAC recommends about a factor of 10", span)
		}
	}
	for _, r := range an.Rates {
		if r*60 > 25 {
			an.warn("a heating rate of %.3g K/min: fast scans of a reacting sample lag behind the sensor and shift the peak; prefer 20 K/min or less", r*60)
			break
		}
	}
}

// isoconversional sets the Kissinger, Ozawa–Flynn–Wall and Friedman
// estimates (the first two only with at least two heating rates) and the
// spread of Friedman's E over α = 0.1 … 0.9,
//
//	EaSpread = (max E − min E) / mean E,
//
// warning above MaxEaSpread that the kinetics are likely multi-step (ICTAC,
// Vyazovkin et al. 2011). Cost: that of Kissinger, OFWAt at every Friedman
// level, and Friedman.
func (an *Analysis) isoconversional(dyn, iso []*Curve) {
	if len(an.Rates) >= 2 {
		var beta, Tp []float64
		for _, c := range dyn {
			beta = append(beta, c.Program.Rate)
			Tp = append(Tp, c.Peak.Temp)
		}
		if k, err := Kissinger(beta, Tp); err == nil {
			an.Kissinger = &k
		}
		if o, err := OFWAt(an.Curves, 0.5); err == nil {
			an.OFW = &o
		}
		for _, a := range FriedmanLevels() {
			if o, err := OFWAt(an.Curves, a); err == nil {
				an.OFWTable = append(an.OFWTable, IsoPoint{Alpha: a, Estimate: o})
			}
		}
	}
	an.Friedman = Friedman(an.Curves, FriedmanLevels())
	lo, hi, sum, n := math.Inf(1), math.Inf(-1), 0.0, 0
	for _, p := range an.Friedman {
		if p.Alpha >= 0.1-1e-9 && p.Alpha <= 0.9+1e-9 {
			lo, hi = min(lo, p.E), max(hi, p.E)
			sum += p.E
			n++
		}
	}
	if n == 0 {
		return
	}
	an.EaSpread = (hi - lo) / (sum / float64(n))
	if an.EaSpread > MaxEaSpread {
		why := ""
		for _, c := range iso {
			if c.Alpha[len(c.Alpha)-1] < StalledCure {
				why = " (here the isothermal scans that vitrify add diffusion-controlled points at high α)"
				break
			}
		}
		an.warn("Friedman's activation energy varies from %.3g to %.3g kJ/mol (%.0f %%) over α = 0.1 to 0.9: multi-step kinetics likely%s; "+
			"a single-step model is only an empirical description", lo/1000, hi/1000, 100*an.EaSpread, why)
	}
}

// fitModel fits opt.Model to all curves at once (see FitContext), started
// from the Friedman estimates, and warns when the fit did not converge, is
// singular or poor (R² < 0.98), with a hint at what to try. It refuses a
// single temperature program (FitRefused; ICTAC, Vyazovkin et al. 2011)
// and records a fit error in FitRefused. Cancelled, it sets FitRefused and
// returns ctx.Err(); otherwise nil. Cost: that of the fit.
func (an *Analysis) fitModel(ctx context.Context, iso []*Curve, opt Options) error {
	if an.Programs < 2 {
		an.FitRefused = "a single temperature program: a model fitted to one heating rate is not determined (ICTAC, Vyazovkin et al. 2011); give scans at 3 or more heating rates"
		return nil
	}
	fit, err := FitContext(ctx, an.Curves, an.Friedman, FitSpec{Model: opt.Model, Diffusion: opt.Diffusion, Progress: opt.Progress})
	if ctx.Err() != nil {
		an.FitRefused = "interrupted before the fit converged"
		return ctx.Err()
	}
	if err != nil {
		an.FitRefused = err.Error()
		return nil
	}
	an.Fit = fit
	fit.Cure.TotalHeat = an.TotalHeat
	if !fit.Converged {
		an.warn("the fit did not converge within its iteration limit: treat the parameters with caution")
	}
	if !fit.Identifiable {
		an.warn("some parameters are not determined by these scans (singular fit): standard errors are not available; add temperature programs")
	}
	if fit.R2 < 0.98 {
		hint := "the kinetics may need more than these models offer"
		switch {
		case opt.Model == Isoconversional:
			hint = "the scans disagree with one another at equal cure (check baselines and total heats), or the reaction paths differ between programs"
		case an.EaSpread > MaxEaSpread:
			hint = "Friedman's activation energy varies with cure: try the model-free table (model isoconversional)"
		case opt.Model == NthOrder:
			hint = "try the autocatalytic model"
		case !opt.Diffusion && countStalled(iso) >= 2:
			hint = "try the diffusion factor (--diffusion)"
		}
		an.warn("the fit is poor (R² = %.3f): %s", fit.R2, hint)
	}
	return nil
}

// countStalled counts the isothermal curves that stop below StalledCure.
func countStalled(iso []*Curve) int {
	n := 0
	for _, c := range iso {
		if c.Alpha[len(c.Alpha)-1] < StalledCure {
			n++
		}
	}
	return n
}

// countIsotherms counts the isotherms of the curves that differ by more
// than 1 K.
func countIsotherms(iso []*Curve) int {
	var seen []float64
	for _, c := range iso {
		T := c.Program.Temperature
		dup := false
		for _, s := range seen {
			if math.Abs(s-T) <= 1 {
				dup = true
			}
		}
		if !dup {
			seen = append(seen, T)
		}
	}
	return len(seen)
}
