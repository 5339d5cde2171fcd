package uncertain

import (
	"cureslab/cases"
	"cureslab/cases/units"
	"fmt"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/stat/distuv"
)

// halfWidth returns w for the nominal value v (SI).
func halfWidth(in *cases.UncertainInput, v float64) float64 {
	if in.Rel != 0 {
		return in.Rel * math.Abs(v)
	}
	return in.Abs
}

// clampU keeps a sample inside (0, 1), so that Φ⁻¹ stays finite (|z| < 6).
func clampU(u float64) float64 { return min(max(u, 1e-9), 1-1e-9) }

// offset returns the change of the value for the sample u in [0, 1) and the
// half-width w: uniform w·(2u − 1), normal (w/2)·Φ⁻¹(u).
func offset(in *cases.UncertainInput, u, w float64) float64 {
	if in.Distribution == cases.DistNormal {
		return w / 2 * distuv.UnitNormal.Quantile(clampU(u))
	}
	return w * (2*u - 1)
}

// perturb returns the value cur (as found in a decoded case) moved by the
// sample u, as shown in uncertainty.csv and as it goes into the case. A
// quantity keeps the unit it is written in (the change is made in SI and
// converted back exactly, also for the affine temperature scales); a plain
// number stays a number. A zero half-width returns cur unchanged.
func perturb(in *cases.UncertainInput, cur any, u float64) (shown string, value any, err error) {
	switch x := cur.(type) {
	case string:
		d := cases.DimOf(x)
		if d == 0 {
			return "", nil, fmt.Errorf("%s is %q, not a quantity", in.Key, x)
		}
		v, err := units.Parse(x, d)
		if err != nil {
			return "", nil, fmt.Errorf("%s: %v", in.Key, err)
		}
		w := halfWidth(in, v)
		if w == 0 {
			return x, x, nil
		}
		_, unit := cases.SplitNumber(strings.TrimSpace(x))
		unit = strings.TrimSpace(unit)
		off, err0 := units.Parse("0 "+unit, d)
		one, err1 := units.Parse("1 "+unit, d)
		if err0 != nil || err1 != nil || one == off {
			return "", nil, fmt.Errorf("%s: cannot write a value in the unit %q of %q", in.Key, unit, x)
		}
		y := (v + offset(in, u, w) - off) / (one - off)
		s := strconv.FormatFloat(y, 'g', 10, 64) + " " + unit
		return s, s, nil
	case int64, float64:
		v, _ := cases.PlainNumber(x)
		w := halfWidth(in, v)
		if w == 0 {
			return cases.Written(x), x, nil
		}
		y, _ := strconv.ParseFloat(strconv.FormatFloat(v+offset(in, u, w), 'g', 10, 64), 64)
		return strconv.FormatFloat(y, 'g', -1, 64), y, nil
	}
	return "", nil, fmt.Errorf("%s is %s, not a number", in.Key, cases.KindOf(cur))
}

// Sample applies the uncertain inputs of u at the sample point us (one u in
// [0, 1) per input) to the tree t in place, and returns the values as shown.
func Sample(u *cases.Uncertainty, t map[string]any, us []float64) ([]string, error) {
	shown := make([]string, len(u.Inputs))
	for k := range u.Inputs {
		in := &u.Inputs[k]
		s, val, err := perturb(in, cases.Leaf(t, in.Path), us[k])
		if err != nil {
			return nil, err
		}
		cases.SetPath(t, in.Path, val)
		shown[k] = s
	}
	return shown, nil
}
