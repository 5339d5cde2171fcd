package sweep

import (
	"cureslab/cases"
	"fmt"
	"strconv"
	"strings"
)

// ParseVary reads a --vary option:
//
//	KEY=V1,V2,...        a list of values
//	KEY=FROM:TO:COUNT    COUNT values from FROM to TO, both included, linear
//	KEY=FROM:TO          a range without count, for latin-hypercube
//
// Values keep their units and may omit the space before it ("12W/m^2/K",
// "4mm"); a plain number is a number and true/false a boolean. A list must
// not repeat a value; a range needs COUNT ≥ 2 and both ends of one
// dimension. Whether KEY exists in the case is checked by New. Errors
// read "--vary KEY=VALUES: what is wrong".
func ParseVary(spec string) (cases.Vary, error) {
	fail := func(format string, a ...any) (cases.Vary, error) {
		return cases.Vary{}, &sweepError{msg: fmt.Sprintf("--vary %s: %s", spec, fmt.Sprintf(format, a...))}
	}
	key, val, ok := strings.Cut(spec, "=")
	key = strings.TrimSpace(key)
	if !ok {
		return fail("want KEY=V1,V2,... or KEY=FROM:TO:COUNT, such as layer.potting.thickness=4mm,8mm")
	}
	if key == "" {
		return fail("the key path before '=' is empty")
	}
	if strings.ContainsAny(key, " \t") {
		return fail("the key path %q contains a space", key)
	}
	if strings.TrimSpace(val) == "" {
		return fail("no values after '='")
	}
	v := cases.Vary{Key: key}
	if strings.Contains(val, ":") {
		parts := strings.Split(val, ":")
		if len(parts) != 2 && len(parts) != 3 {
			return fail("a range is FROM:TO:COUNT, such as 1C/min:5C/min:5 (FROM:TO for latin-hypercube); got %d parts", len(parts))
		}
		for i, p := range parts[:2] {
			if strings.TrimSpace(p) == "" {
				return fail("the %s of the range is empty", []string{"start", "end"}[i])
			}
		}
		if len(parts) == 3 {
			n, err := strconv.Atoi(strings.TrimSpace(parts[2]))
			if err != nil {
				return fail("COUNT %q is not a whole number", parts[2])
			}
			if n < 2 || n > cases.MaxGridRuns {
				return fail("COUNT must be between 2 and %d (both ends are included), got %d", cases.MaxGridRuns, n)
			}
			v.Count = n
		}
		v.From, v.To = cases.ScalarText(parts[0]), cases.ScalarText(parts[1])
		if _, err := cases.NewSpan(v.From, v.To); err != nil {
			return fail("%v", err)
		}
		return v, nil
	}
	seen := make(map[string]bool)
	for _, p := range strings.Split(val, ",") {
		if strings.TrimSpace(p) == "" {
			return fail("empty value in the list")
		}
		x := cases.ScalarText(p)
		s, _, err := cases.ListValue(x)
		if err != nil {
			return fail("%v", err)
		}
		if seen[s] {
			return fail("%q is listed twice", s)
		}
		seen[s] = true
		v.Values = append(v.Values, x)
	}
	return v, nil
}
