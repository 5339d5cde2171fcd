package ttt

import (
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/internal/textout"
	"cureslab/physics"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
)

// Options are the choices of Tabulate. A zero field takes its default.
type Options struct {
	// From, To and Step give the cure temperatures, K (Step a difference,
	// K). Defaults: defaultRange.
	From, To, Step float64
	// Target is the degree of cure of the third column, in (0, 1];
	// default criteria.min_cure of the case, else 0.95.
	Target float64
}

// Row is one cure temperature of a TTT table. A time is +Inf when the
// state is never reached (MaxIsothermalTime), NaN when it does not apply
// (vitrification without a glass transition).
type Row struct {
	Temp    float64 // K
	Gel     float64 // s, to the gel point
	Vitrify float64 // s, until Tg(α) reaches Temp
	Target  float64 // s, to Table.Target
}

// Table is an isothermal time–temperature–transformation table.
type Table struct {
	Material    string
	InitialCure float64 // the case's [initial] cure, the start of every time
	GelPoint    float64
	Target      float64
	Glass       *physics.DiBenedetto // nil: no vitrification column
	Rows        []Row
}

// Tabulate returns the isothermal TTT table of the curing material named
// material in case c: for each cure temperature T from opt.From to opt.To
// in steps of opt.Step, the times, from the case's initial cure α0, to
//
//   - gelation: Cure.IsothermalTime(T, α0, gel_point);
//   - vitrification: the time until the glass transition Tg(α) of the
//     DiBenedetto relation reaches T, that is to α_v = CureAt(T)
//     (Pascault & Williams, J. Polym. Sci. B 28:85, 1990): 0 at or below
//     Tg0 (the resin is glassy from the start), never (+Inf) at or above
//     Tg_full (it never vitrifies); NaN without a glass transition;
//   - the target cure: Cure.IsothermalTime(T, α0, target),
//
// each with the diffusion factor of the material, so that a
// diffusion-limited cure reaches neither a high target nor, at low
// temperatures, vitrification in a finite time (reported as never).
//
// Errors (*Error): a material that is not in the case's stack or does not
// cure, a range or target out of bounds, more than 1000 rows; ctx.Err()
// once ctx is done (checked before each row), with no table.
// Cost: three quadratures per row (about 0.1 ms each).
func Tabulate(ctx context.Context, c *cases.Case, material string, opt Options) (*Table, error) {
	m, ok := c.Materials[material]
	if !ok {
		var names []string
		for n, mm := range c.Materials {
			if mm.Cure != nil {
				names = append(names, n)
			}
		}
		sort.Strings(names)
		msg := fmt.Sprintf("no material %q in the stack of this case", material)
		if g := cases.Suggest(material, names); g != "" {
			msg += fmt.Sprintf("; did you mean %q?", g)
		}
		hint := "the curing materials of this case: " + strings.Join(names, ", ")
		if len(names) == 0 {
			hint = "no layer of this case cures"
		}
		return nil, &cases.Error{File: c.File, Key: "materials", Err: cases.Reason(cases.ErrReference, nil, msg), Hint: hint}
	}
	if m.Cure == nil {
		return nil, &cases.Error{File: c.File, Key: "materials." + material, Err: cases.Reason(cases.ErrRange, nil,
			fmt.Sprintf("material %q does not cure (it has no [materials.%s.cure])", material, material))}
	}
	cure := m.Cure
	from, to, step := defaultRange(c, cure)
	if opt.From != 0 {
		from = opt.From
	}
	if opt.To != 0 {
		to = opt.To
	}
	if opt.Step != 0 {
		step = opt.Step
	}
	bad := func(format string, a ...any) error {
		return &cases.Error{File: c.File, Err: cases.Reason(cases.ErrRange, nil, fmt.Sprintf(format, a...))}
	}
	switch {
	case !(from > 0) || !(to > 0):
		return nil, bad("the cure temperatures must be above absolute zero")
	case !(to >= from):
		return nil, bad("--to (%s) is below --from (%s)", cases.Celsius(to), cases.Celsius(from))
	case !(step > 0):
		return nil, bad("--step must be positive")
	case (to-from)/step > 1000:
		return nil, bad("%s to %s in steps of %g K gives more than 1000 rows", cases.Celsius(from), cases.Celsius(to), step)
	}
	target := opt.Target
	if target == 0 {
		target = 0.95
		if !math.IsNaN(c.Criteria.MinCure) && c.Criteria.MinCure > 0 {
			target = c.Criteria.MinCure
		}
	}
	if !(target > 0 && target <= 1) {
		return nil, bad("the target cure must be in (0, 1], got %g", target)
	}
	a0 := 0.0
	if c.Problem != nil {
		a0 = c.Problem.InitialCure
	}
	t := &Table{Material: material, InitialCure: a0, GelPoint: cure.GelPoint, Target: target, Glass: cure.Glass}
	for i := 0; ; i++ {
		T := from + float64(i)*step
		if T > to+1e-9*step {
			break
		}
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		row := Row{Temp: T, Vitrify: math.NaN()}
		row.Gel = cure.IsothermalTime(T, a0, cure.GelPoint)
		row.Target = cure.IsothermalTime(T, a0, target)
		if g := cure.Glass; g != nil {
			switch {
			case T <= g.Tg0:
				row.Vitrify = 0
			case T >= g.TgFull:
				row.Vitrify = math.Inf(1)
			default:
				row.Vitrify = cure.IsothermalTime(T, a0, g.CureAt(T))
			}
		}
		t.Rows = append(t.Rows, row)
	}
	return t, nil
}

// defaultRange returns the default cure temperatures of a TTT table, K:
// with a glass transition, from max(Tg0, 20 °C) to Tg_full + 20 K, the
// range where vitrification competes with cure; otherwise from 60 K below
// to 20 K above the hottest temperature of the case's schedules (of the
// initial temperature if there are none), not below 0 °C. The ends are
// rounded outwards to multiples of 5 K (in °C) and the step is 1, 2, 5, 10
// or 20 K, giving about 10 to 25 rows.
func defaultRange(c *cases.Case, cure *physics.Cure) (from, to, step float64) {
	const zeroC = 273.15
	if g := cure.Glass; g != nil {
		from, to = max(g.Tg0, zeroC+20), g.TgFull+20
	} else {
		hot := 0.0
		for _, s := range c.Schedules {
			hot = max(hot, s.Max())
		}
		if hot == 0 && c.Problem != nil {
			hot = c.Problem.InitialTemperature
		}
		if hot == 0 {
			hot = zeroC + 100
		}
		from, to = max(hot-60, zeroC), hot+20
	}
	from = zeroC + 5*math.Floor((from-zeroC)/5+1e-9)
	to = zeroC + 5*math.Ceil((to-zeroC)/5-1e-9)
	step = 20
	for _, s := range []float64{1, 2, 5, 10, 20} {
		if (to-from)/s <= 24 {
			step = s
			break
		}
	}
	return from, to, step
}

// header returns the CSV header of t:
// temperature_C,gel_time_s,vitrification_time_s,time_to_<target>_s.
func header(t *Table) []string {
	return []string{"temperature_C", "gel_time_s", "vitrification_time_s",
		"time_to_" + strconv.FormatFloat(t.Target, 'f', -1, 64) + "_s"}
}

// writeCSV writes t as CSV (header): temperatures in °C and times in
// s rounded to 1e-6 and written as the shortest decimal; a time that is
// never reached, or does not apply, is an empty field.
func writeCSV(w io.Writer, t *Table) error {
	cw := csv.NewWriter(w)
	cw.Write(header(t))
	f := func(v float64) string {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return ""
		}
		return strconv.FormatFloat(num.Round6(v), 'f', -1, 64)
	}
	for _, r := range t.Rows {
		cw.Write([]string{f(num.Celsius(r.Temp)), f(r.Gel), f(r.Vitrify), f(r.Target)})
	}
	cw.Flush()
	return cw.Error()
}

// Print writes t as a table for reading: times in s, min, h, days or
// years, "never" for a state not reached and "-" where it does not apply.
func Print(w io.Writer, t *Table) error {
	p := textout.NewPrinter(w)
	p.Printf("Isothermal cure of %s from an initial cure of %g (gel point %.3g", t.Material, t.InitialCure, t.GelPoint)
	if t.Glass != nil {
		p.Printf("; Tg from %s to %s", cases.Celsius(t.Glass.Tg0), cases.Celsius(t.Glass.TgFull))
	} else {
		p.Printf("; no glass_transition: no vitrification column")
	}
	p.Printf(")\n")
	tw := p.Table()
	fmt.Fprintf(tw, "  cure temperature\tto gel\tto vitrify\tto cure %g\n", t.Target)
	h := func(v float64) string {
		switch {
		case math.IsNaN(v):
			return "-"
		case math.IsInf(v, 1):
			return "never"
		}
		return FormatTime(v)
	}
	for _, r := range t.Rows {
		fmt.Fprintf(tw, "  %s C\t%s\t%s\t%s\n", strconv.FormatFloat(num.Round(num.Celsius(r.Temp), 3), 'f', -1, 64), h(r.Gel), h(r.Vitrify), h(r.Target))
	}
	p.Flush(tw)
	if t.Glass != nil {
		p.Printf("  Once vitrified the resin is glassy and cures only as fast as its diffusion factor allows.\n")
	}
	return p.Err()
}

// FormatTime formats a time in s for reading: s below 2 min, min below 2 h, h
// below 2 days, days below 2 years, years beyond.
func FormatTime(t float64) string {
	const day, year = 86400, 365.25 * 86400
	switch {
	case t < 2*day:
		return num.HumanTime(t)
	case t < 2*year:
		return strconv.FormatFloat(t/day, 'f', 1, 64) + " days"
	}
	return strconv.FormatFloat(t/year, 'g', 3, 64) + " years"
}

// WriteFile writes the table t as CSV (writeCSV) to the file path,
// atomically (a temporary file renamed into place).
func WriteFile(path string, t *Table) error {
	return textout.WriteFileAtomic(filepath.Dir(path), filepath.Base(path), func(w io.Writer) error {
		return writeCSV(w, t)
	})
}
