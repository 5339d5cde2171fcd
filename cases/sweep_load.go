package cases

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"cureslab/cases/units"
	"cureslab/physics"
)

// The modes of a sweep (SPEC §6).
const (
	ModeGrid           = "grid"            // every combination of the varied values
	ModeLatinHypercube = "latin-hypercube" // samples drawn by Latin hypercube sampling
)

// Limits on the size of a sweep, so that a typo cannot ask for memory the
// machine does not have.
const (
	maxGridRuns  = 10_000_000
	maxLHSRuns   = 1_000_000
	maxSweepKeys = 64
)

var (
	sweepKeys = []string{"mode", "samples", "seed", "vary"}
	varyKeys  = []string{"key", "values", "from", "to", "count"}
)

// Vary is one varied key of a sweep, from a [[sweep.vary]] table or a
// --vary option (ParseVary): either a list of Values, or a range From..To.
//
// Values, From and To are TOML values: a string (a quantity with its unit,
// "8 mm", or a name such as a schedule), an int64, a float64 or a bool.
// Count is the number of values of a range in grid mode (≥ 2, both ends
// included, linear); latin-hypercube draws from the whole range and ignores
// Count.
type Vary struct {
	Key      string
	Values   []any
	From, To any
	Count    int
}

// isRange reports whether v is a range (From/To) rather than a list.
func (v Vary) isRange() bool { return v.From != nil || v.To != nil }

// sweepSpec is the [sweep] section of a case as read by the loader.
type sweepSpec struct {
	mode    string // "" when not given (grid)
	samples int    // 0 when not given
	seed    uint64
	hasSeed bool
	vary    []Vary
}

// sweepSection reads and checks [sweep] (SPEC §6): mode, samples, seed and
// every [[sweep.vary]]: its key path must lead to an existing table of the
// case (whether the last key itself is valid is checked by NewSweep, which
// tries it), its values must be single values, a range needs both ends of
// the same dimension and, in grid mode, a count ≥ 2. It returns nil when the
// case has no [sweep] or it is not a table.
func (l *loader) sweepSection(root *table) *sweepSpec {
	t := l.sub(root, "sweep", sweepKeys, nil)
	if t == nil {
		return nil
	}
	s := &sweepSpec{}
	if m, ok := l.str(t, "mode"); ok {
		if m != ModeGrid && m != ModeLatinHypercube {
			e := l.rangeErr(t.keyPath("mode"), m, "mode must be %q or %q", ModeGrid, ModeLatinHypercube)
			if g := Suggest(m, []string{ModeGrid, ModeLatinHypercube}); g != "" {
				e.Hint = fmt.Sprintf("did you mean mode = %q?", g)
			}
		}
		s.mode = m
	}
	lhs := s.mode == ModeLatinHypercube
	if n, ok := l.integer(t, "samples"); ok {
		switch {
		case !lhs:
			l.atKey(t.keyPath("samples"), ErrRange, "samples goes with mode = %q only", ModeLatinHypercube).Hint =
				"a grid runs every combination of the values; remove samples, or set mode = \"latin-hypercube\""
		case n < 1 || n > maxLHSRuns:
			l.rangeErr(t.keyPath("samples"), n, "samples must be between 1 and %d", maxLHSRuns)
		default:
			s.samples = int(n)
		}
	} else if lhs && !t.has("samples") {
		l.add(l.loc.table(t.path), t.keyPath("samples"), ErrMissing, nil,
			fmt.Sprintf("missing: mode = %q needs samples (the number of runs)", ModeLatinHypercube)).Hint =
			"add, for example: samples = 200"
	}
	if n, ok := l.integer(t, "seed"); ok {
		switch {
		case !lhs:
			l.atKey(t.keyPath("seed"), ErrRange, "seed goes with mode = %q only", ModeLatinHypercube)
		case n < 0:
			l.rangeErr(t.keyPath("seed"), n, "seed must not be negative")
		default:
			s.seed, s.hasSeed = uint64(n), true
		}
	}
	if !t.has("vary") {
		return s
	}
	items, ok := l.arrayAt(t.keyPath("vary"), t.m["vary"])
	if !ok {
		return s
	}
	seen := make(map[string]string)
	for i, item := range items {
		path := fmt.Sprintf("sweep.vary.%d", i)
		vt := l.open(path, item, varyKeys, nil)
		if vt == nil {
			continue
		}
		if v, ok := l.varyTable(vt, root, lhs, seen); ok {
			s.vary = append(s.vary, v)
		}
	}
	if len(s.vary) > maxSweepKeys {
		l.atValue("sweep.vary", ErrRange, "at most %d keys can be varied, got %d", maxSweepKeys, len(s.vary))
	}
	return s
}

// varyTable reads one [[sweep.vary]] table.
func (l *loader) varyTable(t *table, root *table, lhs bool, seen map[string]string) (Vary, bool) {
	before := len(l.errs)
	var v Vary
	if !l.require(t, "key") {
		return v, false
	}
	key, ok := l.str(t, "key")
	if !ok {
		return v, false
	}
	v.Key = key
	if _, _, err := resolveKey(root.m, key); err != nil {
		l.atValue(t.keyPath("key"), ErrReference, "%s", err)
	} else if prev, dup := seen[key]; dup {
		l.atValue(t.keyPath("key"), ErrDuplicate, "%q is already varied (line %d)", key, l.loc.value(prev).Line)
	} else {
		seen[key] = t.keyPath("key")
	}
	list, rng := t.has("values"), t.has("from") || t.has("to")
	switch {
	case list && rng:
		l.atKey(t.keyPath("values"), ErrRange, "give either values = [...] or from/to, not both")
	case list:
		if t.has("count") {
			l.atKey(t.keyPath("count"), ErrRange, "count goes with from/to, not with values")
		}
		vals, ok := l.array(t, "values")
		if !ok {
			break
		}
		if len(vals) == 0 {
			l.atValue(t.keyPath("values"), ErrMissing, "values is empty: list at least one value")
		}
		shown := make(map[string]int)
		for i, x := range vals {
			p := fmt.Sprintf("%s.%d", t.keyPath("values"), i)
			s, _, err := listValue(x)
			if err != nil {
				l.atValue(p, ErrType, "%s", err)
				continue
			}
			if j, dup := shown[s]; dup {
				l.atValue(p, ErrDuplicate, "%q is listed twice (also element %d)", s, j)
				continue
			}
			shown[s] = i
			v.Values = append(v.Values, x)
		}
	case rng:
		if !l.require(t, "from", "to") {
			break
		}
		v.From, v.To = t.m["from"], t.m["to"]
		if _, err := newSpan(v.From, v.To); err != nil {
			l.atValue(t.keyPath("to"), ErrUnit, "%s", err)
		}
		if n, ok := l.integer(t, "count"); ok {
			if n < 2 || n > maxGridRuns {
				l.rangeErr(t.keyPath("count"), n, "count must be between 2 and %d (both ends are included)", maxGridRuns)
			}
			v.Count = int(min(max(n, 0), maxGridRuns))
		} else if !lhs && !t.has("count") {
			l.add(l.loc.table(t.path), t.keyPath("count"), ErrMissing, nil,
				"missing: a range in a grid needs count (the number of values, both ends included)").Hint =
				"add, for example: count = 5"
		}
	case l.suggested[t.keyPath("values")] || l.suggested[t.keyPath("from")] || l.suggested[t.keyPath("to")]:
		// a misspelt key, already reported with its suggestion
	default:
		l.add(l.loc.table(t.path), t.keyPath("values"), ErrMissing, nil,
			"missing: a [[sweep.vary]] needs values = [...] or from, to (and count)").Hint =
			"for example: values = [\"4 mm\", \"8 mm\"], or from = \"1 C/min\", to = \"5 C/min\", count = 5"
	}
	return v, len(l.errs) == before
}

// resolveKey follows the sweep key path key through the decoded case doc
// and returns the path of keys and 0-based indices that the loader uses
// (a layer named in the key becomes its index: layer.potting.thickness ->
// layer.0.thickness), and whether the last key is present in the case.
//
// Every table and array element on the way must exist; the last key may be
// absent from its table (such as time.end), and it must not be a table or an
// array (vary one of their keys or elements instead). Elements of arrays of
// tables with a name key (layers) are found by name first, then by index.
// The error says what is missing and suggests the nearest existing key.
func resolveKey(doc map[string]any, key string) (path []string, exists bool, err error) {
	if key == "" {
		return nil, false, fmt.Errorf("the key path is empty")
	}
	parts := strings.Split(key, ".")
	for _, p := range parts {
		if p == "" {
			return nil, false, fmt.Errorf("key path %q has an empty part", key)
		}
	}
	switch parts[0] {
	case "sweep", "uncertainty":
		return nil, false, fmt.Errorf("[%s] cannot be varied", parts[0])
	}
	var cur any = doc
	for i, p := range parts {
		last := i == len(parts)-1
		where := strings.Join(parts[:i], ".")
		switch x := cur.(type) {
		case map[string]any:
			next, ok := x[p]
			if !ok {
				if last && (i > 0 || p == "title") {
					return append(path, p), false, nil
				}
				return nil, false, missingKey(x, parts, i)
			}
			path, cur = append(path, p), next
		case []map[string]any, []any:
			idx, msg := element(x, p)
			if idx < 0 {
				return nil, false, fmt.Errorf("%s: %s", where, msg)
			}
			path = append(path, strconv.Itoa(idx))
			cur = index(x, idx)
		default:
			return nil, false, fmt.Errorf("%s is a single value, not a table: it has no %q", where, p)
		}
	}
	switch cur.(type) {
	case map[string]any:
		return nil, false, fmt.Errorf("%s is a table: vary one of its keys (%s)", key, strings.Join(sortedKeys(cur.(map[string]any)), ", "))
	case []map[string]any, []any:
		return nil, false, fmt.Errorf("%s is an array: vary one of its elements, such as %s.0", key, key)
	}
	return path, true, nil
}

// missingKey explains why parts[i] is not a key of the table m found at
// parts[:i].
func missingKey(m map[string]any, parts []string, i int) error {
	p := parts[i]
	if i == 0 {
		if contains(topKeys, p) {
			return fmt.Errorf("the case has no [%s]: add it to the case to vary its keys", p)
		}
		if g := Suggest(p, topKeys); g != "" {
			return fmt.Errorf("unknown section %q; did you mean %q?", p, g)
		}
		return fmt.Errorf("unknown section %q (sections: %s)", p, strings.Join(topKeys, ", "))
	}
	where := strings.Join(parts[:i], ".")
	if where == "materials" {
		msg := fmt.Sprintf("the case has no [materials.%s]", p)
		if g := Suggest(p, sortedKeys(m)); g != "" {
			msg += fmt.Sprintf("; did you mean %q?", g)
		} else if _, ok := physics.Builtin(p); ok {
			msg += "; a built-in material cannot be varied: copy its values into a [materials." + p + "] of the case"
		}
		return fmt.Errorf("%s", msg)
	}
	if where == "schedules" {
		return fmt.Errorf("the case has no [schedules.%s]%s", p, didYouMeanKey(p, sortedKeys(m)))
	}
	return fmt.Errorf("%s has no %q%s (it has: %s)", where, p, didYouMeanKey(p, sortedKeys(m)), strings.Join(sortedKeys(m), ", "))
}

func didYouMeanKey(got string, valid []string) string {
	if g := Suggest(got, valid); g != "" {
		return fmt.Sprintf("; did you mean %q?", g)
	}
	return ""
}

// element finds p in the array a: by the name key of its tables first
// (layers), then as a 0-based index. It returns -1 and why when there is
// no such element.
func element(a any, p string) (int, string) {
	n := arrayLen(a)
	var names []string
	for i := range n {
		if m, ok := index(a, i).(map[string]any); ok {
			if name, ok := m["name"].(string); ok {
				if name == p {
					return i, ""
				}
				names = append(names, name)
			}
		}
	}
	if k, err := strconv.Atoi(p); err == nil && k >= 0 && k < n && strconv.Itoa(k) == p {
		return k, ""
	}
	if len(names) > 0 {
		return -1, fmt.Sprintf("no element named %q%s (names: %s)", p, didYouMeanKey(p, names), strings.Join(names, ", "))
	}
	return -1, fmt.Sprintf("no element %q: it has %d (indices 0 to %d)", p, n, n-1)
}

func arrayLen(a any) int {
	switch x := a.(type) {
	case []map[string]any:
		return len(x)
	case []any:
		return len(x)
	}
	return 0
}

func index(a any, i int) any {
	switch x := a.(type) {
	case []map[string]any:
		return x[i]
	case []any:
		return x[i]
	}
	return nil
}

// listValue checks one element of a values list and returns it as shown in
// summary.csv and as it goes into the case: a string is normalised by
// normalizeQuantity, a number is written in its shortest form.
func listValue(x any) (shown string, value any, err error) {
	switch v := x.(type) {
	case string:
		s := normalizeQuantity(strings.TrimSpace(v))
		if s == "" {
			return "", nil, fmt.Errorf("a value must not be empty")
		}
		return s, s, nil
	case int64:
		return strconv.FormatInt(v, 10), v, nil
	case float64:
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return "", nil, fmt.Errorf("a value must be finite, got %v", v)
		}
		return strconv.FormatFloat(v, 'g', -1, 64), v, nil
	case bool:
		return strconv.FormatBool(v), v, nil
	}
	return "", nil, fmt.Errorf("a varied value must be a single value (a string with its unit, a number or a boolean), got %s", kindOf(x))
}

// normalizeQuantity puts one space between the number and the unit of a
// quantity written without it ("12W/m^2/K" -> "12 W/m^2/K"), when the result
// is a valid quantity of some dimension; any other string is returned as it
// is (a schedule name such as "2nd-oven" stays whole).
func normalizeQuantity(s string) string {
	num, unit := splitNumber(s)
	if num == "" || unit == "" || unit[0] == ' ' || unit[0] == '\t' {
		return s
	}
	spaced := num + " " + unit
	if dimOf(spaced) == 0 {
		return s
	}
	return spaced
}

// splitNumber splits s into the decimal number at its start (sign, digits,
// point, exponent) and the rest; num is "" when s does not start with one.
func splitNumber(s string) (num, rest string) {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		i, digits = i+1, digits+1
	}
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i, digits = i+1, digits+1
		}
	}
	if digits == 0 {
		return "", s
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			j++
		}
		k := j
		for k < len(s) && s[k] >= '0' && s[k] <= '9' {
			k++
		}
		if k > j {
			i = k
		}
	}
	return s[:i], s[i:]
}

// dimOf returns the first dimension, in the order of package units, that s
// reads as, or 0 when it reads as none.
func dimOf(s string) units.Dim {
	for d := units.Length; d <= units.PowerDensity; d++ {
		if _, err := units.Parse(s, d); err == nil {
			return d
		}
	}
	return 0
}

// span is a resolved range of a sweep: both ends in the unit of From (or
// plain numbers), so that a value between them is written in that unit.
type span struct {
	from, to float64 // in unit (plain numbers when unit is "")
	unit     string  // the unit of From as written, "" for plain numbers
	integer  bool    // both ends are whole numbers without unit: values are rounded to int64
	decimals int     // decimals written: 9 significant digits of the larger end
}

// newSpan resolves the ends of a range: both quantities of one dimension
// (To is converted to the unit of From), or both plain numbers.
//
// Method: the dimension is the first one both ends read as (units.Parse);
// To in the unit u of From is (To_SI − off)/scale with off = "0 u" and
// scale = "1 u" − off in SI, which is exact for the affine temperature
// scales too, so interpolating in u is interpolating linearly in SI.
func newSpan(from, to any) (span, error) {
	var sp span
	switch f := from.(type) {
	case int64, float64:
		a, okA := plainNumber(f)
		b, okB := plainNumber(to)
		if !okA || !okB {
			return sp, fmt.Errorf("from = %s and to = %s must both be plain numbers, or both quantities with units", written(from), written(to))
		}
		_, intA := from.(int64)
		_, intB := to.(int64)
		sp = span{from: a, to: b, integer: intA && intB}
	case string:
		t, ok := to.(string)
		if !ok {
			return sp, fmt.Errorf("from = %s and to = %s must both be quantities with units, or both plain numbers", written(from), written(to))
		}
		f, t = strings.TrimSpace(f), strings.TrimSpace(t)
		num, unit := splitNumber(f)
		unit = strings.TrimSpace(unit)
		if num == "" || unit == "" {
			return sp, fmt.Errorf("from = %q is not a number with a unit, such as \"1 C/min\"", f)
		}
		a, err := strconv.ParseFloat(num, 64)
		if err != nil || math.IsInf(a, 0) {
			return sp, fmt.Errorf("from = %q has a number out of range", f)
		}
		var d units.Dim
		var bSI float64
		for d = units.Length; d <= units.PowerDensity; d++ {
			if _, err := units.Parse(f, d); err != nil {
				continue
			}
			if bSI, err = units.Parse(t, d); err == nil {
				break
			}
		}
		if d > units.PowerDensity {
			if fd := dimOf(f); fd != 0 {
				return sp, fmt.Errorf("to = %q is not %s like from = %q", t, article(fd), f)
			}
			return sp, fmt.Errorf("from = %q is not a quantity with a known unit", f)
		}
		off, err0 := units.Parse("0 "+unit, d)
		one, err1 := units.Parse("1 "+unit, d)
		if err0 != nil || err1 != nil || one == off {
			return sp, fmt.Errorf("from = %q: cannot convert to its unit %q", f, unit)
		}
		sp = span{from: a, to: (bSI - off) / (one - off), unit: unit}
	default:
		return sp, fmt.Errorf("from must be a quantity with its unit or a plain number, got %s", kindOf(from))
	}
	if math.IsNaN(sp.to) || math.IsInf(sp.to, 0) || math.IsNaN(sp.from) || math.IsInf(sp.from, 0) {
		return sp, fmt.Errorf("the ends of the range must be finite")
	}
	if sp.from == sp.to {
		return sp, fmt.Errorf("from and to are equal (%s): give a list of one value instead", written(from))
	}
	big := max(math.Abs(sp.from), math.Abs(sp.to))
	sp.decimals = max(0, min(20, 8-int(math.Floor(math.Log10(big)))))
	return sp, nil
}

func plainNumber(x any) (float64, bool) {
	switch v := x.(type) {
	case int64:
		return float64(v), true
	case float64:
		return v, true
	}
	return 0, false
}

// at returns the value of the range at fraction f in [0, 1] (f = 1 gives To
// exactly), as shown in summary.csv and as it goes into the case:
//
//	v = From + (To − From)·f, in the unit of From
//
// rounded to 9 significant digits of the larger end (so 0.1 + 0.2 is shown
// as 0.3 and the run uses exactly the value shown), or to a whole number
// when both ends are integers.
func (sp span) at(f float64) (shown string, value any) {
	v := sp.from + (sp.to-sp.from)*f
	if f == 1 {
		v = sp.to
	}
	if sp.integer {
		n := int64(math.Round(v))
		return strconv.FormatInt(n, 10), n
	}
	s := strconv.FormatFloat(v, 'f', sp.decimals, 64)
	if strings.Contains(s, ".") {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	if s == "-0" {
		s = "0"
	}
	if sp.unit == "" {
		x, _ := strconv.ParseFloat(s, 64)
		return s, x
	}
	s += " " + sp.unit
	return s, s
}

// scalarText classifies a value typed on the command line as TOML would:
// true/false are booleans, an integer or a decimal number is a number,
// anything else is a string (a quantity with its unit, normalised, or a
// name).
func scalarText(s string) any {
	s = strings.TrimSpace(s)
	switch s {
	case "true":
		return true
	case "false":
		return false
	}
	if num, rest := splitNumber(s); num != "" && rest == "" {
		if n, err := strconv.ParseInt(num, 10, 64); err == nil {
			return n
		}
		if x, err := strconv.ParseFloat(num, 64); err == nil && !math.IsInf(x, 0) {
			return x
		}
	}
	return normalizeQuantity(s)
}

// ParseVary reads a --vary option (SPEC §6):
//
//	KEY=V1,V2,...        a list of values
//	KEY=FROM:TO:COUNT    COUNT values from FROM to TO, both included, linear
//	KEY=FROM:TO          a range without count, for latin-hypercube
//
// Values keep their units and may omit the space before it ("12W/m^2/K",
// "4mm"); a plain number is a number and true/false a boolean. A list must
// not repeat a value; a range needs COUNT ≥ 2 and both ends of one
// dimension. Whether KEY exists in the case is checked by NewSweep. Errors
// read "--vary SPEC: what is wrong".
func ParseVary(spec string) (Vary, error) {
	fail := func(format string, a ...any) (Vary, error) {
		return Vary{}, &sweepError{msg: fmt.Sprintf("--vary %s: %s", spec, fmt.Sprintf(format, a...))}
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
	v := Vary{Key: key}
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
			if n < 2 || n > maxGridRuns {
				return fail("COUNT must be between 2 and %d (both ends are included), got %d", maxGridRuns, n)
			}
			v.Count = n
		}
		v.From, v.To = scalarText(parts[0]), scalarText(parts[1])
		if _, err := newSpan(v.From, v.To); err != nil {
			return fail("%v", err)
		}
		return v, nil
	}
	seen := make(map[string]bool)
	for _, p := range strings.Split(val, ",") {
		if strings.TrimSpace(p) == "" {
			return fail("empty value in the list")
		}
		x := scalarText(p)
		s, _, err := listValue(x)
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
