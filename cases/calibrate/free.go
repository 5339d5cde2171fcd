package calibrate

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"cureslab/cases"
	"cureslab/cases/units"
	"cureslab/solver"
)

// ErrFree is wrapped by the errors of a --free option that cannot be used.
var ErrFree = errors.New("bad free value")

// freeFail returns an error about a --free option, wrapping ErrFree.
func freeFail(format string, a ...any) error {
	return cases.Reason(ErrFree, nil, fmt.Sprintf(format, a...))
}

// Free is one value to fit: a key path into the case, as in sweeps (top.h,
// layer.NAME.contact_resistance, materials.NAME.cure.total_heat, ...), and
// optional bounds: TOML values (a quantity string with its unit, or a plain
// number), nil for none.
type Free struct {
	Key    string
	Lo, Hi any
}

// ParseFree reads a --free option:
//
//	KEY            free, unbounded
//	KEY=LO:HI      within LO and HI, in units (5W/m^2/K:40W/m^2/K)
//	KEY=LO:  or  KEY=:HI   one bound
//
// Bounds keep their units and may omit the space before them; a value
// written as a plain number in the case takes plain numbers. Whether KEY
// exists is checked by Calibrate.
func ParseFree(spec string) (Free, error) {
	fail := func(format string, a ...any) (Free, error) {
		return Free{}, freeFail("--free %s: %s", spec, fmt.Sprintf(format, a...))
	}
	key, val, hasVal := strings.Cut(spec, "=")
	key = strings.TrimSpace(key)
	if key == "" {
		return fail("want KEY or KEY=LO:HI, such as top.h or top.h=5W/m^2/K:40W/m^2/K")
	}
	if strings.ContainsAny(key, " \t") {
		return fail("the key path %q contains a space", key)
	}
	f := Free{Key: key}
	if !hasVal {
		return f, nil
	}
	lo, hi, ok := strings.Cut(val, ":")
	if !ok || strings.Contains(hi, ":") || strings.TrimSpace(lo) == "" && strings.TrimSpace(hi) == "" {
		return fail("want the range LO:HI after '=' (either end may be left out), such as 5W/m^2/K:40W/m^2/K")
	}
	if s := strings.TrimSpace(lo); s != "" {
		f.Lo = cases.ScalarText(s)
	}
	if s := strings.TrimSpace(hi); s != "" {
		f.Hi = cases.ScalarText(s)
	}
	if f.Lo != nil && f.Hi != nil {
		if _, err := cases.NewSpan(f.Lo, f.Hi); err != nil {
			return fail("%v", err)
		}
	}
	return f, nil
}

// fixedSections are the parts of a case whose values describe the
// computation or its outputs, not the part or the process: not free.
var fixedSections = []string{"title", "time", "mesh", "output", "criteria", "sweep", "uncertainty"}

// logDims are the dimensions fitted on a logarithmic scale: positive
// values whose plausible range spans decades.
var logDims = map[units.Dim]bool{
	units.HeatTransferCoefficient: true,
	units.ContactResistance:       true,
	units.RateConstant:            true,
}

// binding ties the free values to the case: their paths, units and
// scales, and how to write a value back.
type binding struct {
	v      *cases.CaseVariant
	params []Param
	paths  [][]string
	plain  []bool // written as a plain number (else a quantity with Unit)
	notes  []string
}

// literal returns the value x of free value i as it goes into the case
// tree (a quantity string or a float64), with digits significant digits
// (-1: the shortest that reads back exactly).
func (b *binding) literal(i int, x float64, digits int) any {
	s := strconv.FormatFloat(x, 'g', digits, 64)
	if b.plain[i] {
		return x
	}
	return withUnit(s, b.params[i].Unit)
}

// withUnit writes a number (as text) with its unit: "12 W/m^2/K", or the
// number alone when the value has no unit.
func withUnit(v, unit string) string {
	if unit == "" {
		return v
	}
	return v + " " + unit
}

// problem returns the solver problem of the case with the free values vals.
func (b *binding) problem(vals []float64) (*solver.Problem, error) {
	sets := make([]cases.ValueSetting, len(vals))
	for i, x := range vals {
		sets[i] = cases.ValueSetting{Path: b.paths[i], Value: b.literal(i, x, -1)}
	}
	c, err := b.v.Parse(b.v.Tree(sets))
	if err != nil {
		return nil, err
	}
	return c.Problem, nil
}

// bind resolves the free values in the case v (bindFree) and checks that
// the case accepts a change of each (checkChanges).
func bind(v *cases.CaseVariant, frees []Free) (*binding, error) {
	if len(frees) == 0 {
		return nil, freeFail("no free value: give one or more --free KEY, such as --free top.h")
	}
	b := &binding{v: v}
	seen := map[string]string{}
	for _, f := range frees {
		bf, err := bindFree(v, f, seen)
		if err != nil {
			return nil, err
		}
		if bf.note != "" {
			b.notes = append(b.notes, bf.note)
		}
		b.params = append(b.params, bf.p)
		b.paths = append(b.paths, bf.path)
		b.plain = append(b.plain, bf.plain)
	}
	if err := b.checkChanges(); err != nil {
		return nil, err
	}
	return b, nil
}

// boundFree is one free value resolved in the case.
type boundFree struct {
	p     Param
	path  []string  // its key path in the case's tree
	plain bool      // written as a plain number (else a quantity in p.Unit)
	dim   units.Dim // the dimension of its quantity (0 when plain)
	note  string    // where the fit starts when not from the case's value, "" otherwise
	fail  func(format string, a ...any) error
}

// bindFree resolves f in the case v: its key path (not in a fixed section,
// not the same value as an earlier one, recorded in seen), its unit (the
// case's, or the bounds' for a value the case does not set), its bounds and
// scale, and its starting value (the case's, else the middle of its range).
func bindFree(v *cases.CaseVariant, f Free, seen map[string]string) (*boundFree, error) {
	fail := func(format string, a ...any) error {
		return freeFail("--free %s: %s", f.Key, fmt.Sprintf(format, a...))
	}
	first := strings.SplitN(f.Key, ".", 2)[0]
	for _, s := range fixedSections {
		if first == s {
			return nil, fail("[%s] describes the computation or its outputs, not the part or the process: it cannot be fitted", s)
		}
	}
	path, exists, err := cases.ResolveKey(v.Doc, f.Key)
	if err != nil {
		return nil, fail("%v", err)
	}
	joined := strings.Join(path, ".")
	if prev, dup := seen[joined]; dup {
		return nil, fail("the same value as --free %s", prev)
	}
	seen[joined] = f.Key
	bf := &boundFree{p: Param{Key: f.Key, Lo: math.Inf(-1), Hi: math.Inf(1)}, path: path, fail: fail}
	var start float64
	if exists {
		start, err = bf.fromCase(cases.Leaf(v.Doc, path))
	} else {
		err = bf.fromBounds(v, f)
	}
	if err != nil {
		return nil, err
	}
	p := &bf.p
	if f.Lo != nil {
		if p.Lo, err = bf.bound(f.Lo, "lower"); err != nil {
			return nil, err
		}
	}
	if f.Hi != nil {
		if p.Hi, err = bf.bound(f.Hi, "upper"); err != nil {
			return nil, err
		}
	}
	if !(p.Lo < p.Hi) {
		return nil, fail("the lower bound is not below the upper one")
	}
	p.Log = logDims[bf.dim]
	p.Ratio = bf.dim != units.Temperature
	if err := bf.setStart(start, exists); err != nil {
		return nil, err
	}
	return bf, nil
}

// fromCase takes the unit (or plainness) of the free value from old, the
// value the case has there, and returns old as a number in that unit.
func (bf *boundFree) fromCase(old any) (float64, error) {
	switch old := old.(type) {
	case int64, float64:
		bf.plain = true
		start, _ := cases.PlainNumber(old)
		return start, nil
	case string:
		num, unit := cases.SplitNumber(strings.TrimSpace(old))
		bf.dim = cases.DimOf(old)
		if num == "" || bf.dim == 0 {
			return 0, bf.fail("the case has %q there, not a number or a quantity: only numeric values can be fitted", old)
		}
		bf.p.Unit = strings.TrimSpace(unit)
		start, _ := cases.InUnit(old, bf.p.Unit)
		return start, nil
	default:
		return 0, bf.fail("the case has %s there: only numeric values can be fitted", cases.Written(old))
	}
}

// fromBounds handles a free value f that the case does not set: a key the
// case could have (a default) or a misspelt one. Its range must be given
// and its lower bound gives its unit.
func (bf *boundFree) fromBounds(v *cases.CaseVariant, f Free) error {
	var probe any = int64(0)
	if f.Lo != nil {
		probe = f.Lo
	}
	if err := v.Validate(v.Tree([]cases.ValueSetting{{Path: bf.path, Value: probe}})); errors.Is(err, cases.ErrUnknownKey) {
		var list cases.ErrorList
		if errors.As(err, &list) {
			for _, e := range list {
				if errors.Is(e, cases.ErrUnknownKey) {
					return bf.fail("%v", e.Err)
				}
			}
		}
		return bf.fail("%v", err)
	}
	if f.Lo == nil || f.Hi == nil {
		return bf.fail("the case does not set it: give its range, such as %s=LO:HI with units", f.Key)
	}
	s, ok := f.Lo.(string)
	if !ok {
		bf.plain = true
		return nil
	}
	num, unit := cases.SplitNumber(strings.TrimSpace(s))
	bf.dim = cases.DimOf(s)
	if num == "" || bf.dim == 0 {
		return bf.fail("the bound %q is not a quantity with a unit", s)
	}
	bf.p.Unit = strings.TrimSpace(unit)
	return nil
}

// bound returns the bound x (which: "lower" or "upper") in the free value's
// unit: a plain number for a plain value, else a quantity of its dimension.
func (bf *boundFree) bound(x any, which string) (float64, error) {
	if bf.plain {
		if y, ok := cases.PlainNumber(x); ok {
			return y, nil
		}
		return 0, bf.fail("the %s bound %s must be a plain number, as the value is", which, cases.Written(x))
	}
	if _, isNum := x.(string); !isNum {
		return 0, bf.fail("the %s bound %s needs a unit, such as %s", which, cases.Written(x), bf.dim.Example())
	}
	y, ok := cases.InUnit(x, bf.p.Unit)
	if !ok || cases.DimOf(x.(string)) != bf.dim {
		return 0, bf.fail("the %s bound %s is not %s like the value (%s)", which, cases.Written(x), bf.dim.WithArticle(), bf.p.Unit)
	}
	return y, nil
}

// setStart sets where the fit starts: start, the case's value, when the
// case sets one (exists) that lies inside the range (and is positive on a
// logarithmic scale); else the middle of the range, geometric on a
// logarithmic scale, said in a note.
func (bf *boundFree) setStart(start float64, exists bool) error {
	p := &bf.p
	if !exists || (p.Log && !(start > 0)) {
		switch {
		case p.Log && p.Lo > 0 && !math.IsInf(p.Hi, 1):
			start = math.Sqrt(p.Lo * p.Hi)
		case !p.Log && !math.IsInf(p.Lo, -1) && !math.IsInf(p.Hi, 1):
			start = (p.Lo + p.Hi) / 2
		default:
			return bf.fail("the case's value is %s: a fit on a logarithmic scale starts from a positive value; give a range with a positive lower bound, such as %s=LO:HI", fmtVal(start), p.Key)
		}
		bf.note = fmt.Sprintf("%s starts at the middle of its range (%s)%s", p.Key, withUnit(fmtVal(start), p.Unit),
			map[bool]string{true: ", geometric: it is fitted on a logarithmic scale", false: ""}[p.Log])
	} else if !(start > p.Lo && start < p.Hi) {
		return bf.fail("the case's value %s is not inside the range: the fit starts from the case's values; widen the range or edit the case", withUnit(fmtVal(start), p.Unit))
	}
	p.Start = start
	return nil
}

// checkChanges refuses a free value the case does not accept other values
// of: each is moved by 0.1 % from its start (to 1e-3 from 0), the others
// at theirs, and the case parsed again.
func (b *binding) checkChanges() error {
	vals := make([]float64, len(b.params))
	for i, p := range b.params {
		vals[i] = p.Start
	}
	for i, p := range b.params {
		step := append([]float64(nil), vals...)
		step[i] = p.Start * (1 + 1e-3)
		if p.Start == 0 {
			step[i] = 1e-3
		}
		if _, err := b.problem(step); err != nil {
			var list cases.ErrorList
			msg := err.Error()
			if errors.As(err, &list) && len(list) > 0 {
				msg = list[0].Err.Error()
			}
			return freeFail("--free %s: the case is invalid when it changes (%s): it cannot be fitted", p.Key, msg)
		}
	}
	return nil
}
