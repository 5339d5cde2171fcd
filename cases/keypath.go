package cases

import (
	"context"
	"cureslab/cases/internal/num"
	"cureslab/cases/tomltext"
	"cureslab/cases/units"
	"cureslab/physics"
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"
)

// parseDroppingProbes validates the case tree t (of the file name with the
// source text, for positions) with parseTree. When the only errors are
// [output] probes below the stack, and keep does not claim them (a varied
// probe must fail its run), those probes are dropped from t and the tree is
// parsed again: a probe that a thinner sample puts outside the stack does not
// enter the summary, so the run goes on without it, and the case's Notes
// say which probes were left out.
func parseDroppingProbes(name, text, dir string, t map[string]any, keep func(path string) bool) (*Case, error) {
	c, err := parseTree(context.Background(), name, text, t, dir)
	var list ErrorList
	if err == nil || !errors.As(err, &list) {
		return c, err
	}
	out, _ := t["output"].(map[string]any)
	probes, _ := out["probes"].([]any)
	drop := make(map[int]bool)
	for _, e := range list {
		rest, ok := strings.CutPrefix(e.Key, "output.probes.")
		i, aerr := strconv.Atoi(rest)
		if !ok || aerr != nil || i < 0 || i >= len(probes) || !errors.Is(e, ErrRange) || keep("output.probes."+rest) {
			return nil, err
		}
		drop[i] = true
	}
	kept := make([]any, 0, len(probes))
	var left []string
	for i, p := range probes {
		if !drop[i] {
			kept = append(kept, p)
		} else {
			left = append(left, fmt.Sprintf("output.probes.%d (%v)", i, p))
		}
	}
	out["probes"] = kept
	c, err = parseTree(context.Background(), name, text, t, dir)
	if err == nil {
		word := "probe"
		if len(left) > 1 {
			word = "probes"
		}
		c.Notes = append(c.Notes, fmt.Sprintf("left out the %s below the %s mm stack of this run: %s",
			word, num.FormatDepth(c.Problem.Mesh.Thickness()), strings.Join(left, ", ")))
	}
	return c, err
}

// Leaf returns the value at a path found by resolveKey.
func Leaf(doc map[string]any, path []string) any {
	var cur any = doc
	for _, p := range path {
		switch x := cur.(type) {
		case map[string]any:
			cur = x[p]
		default:
			j, _ := strconv.Atoi(p)
			cur = index(x, j)
		}
	}
	return cur
}

// CheckKind checks the values of v against the value old that the case has
// at the key: a quantity must stay a quantity of the same dimension, a
// number a number and a boolean a boolean, so that a missing unit ("10"
// for top.h) is caught before anything runs. A value that has the right
// dimension but is out of range (a negative thickness) passes: its run
// fails with the loader's message.
func CheckKind(old any, v Vary) error {
	vals := v.Values
	if v.IsRange() {
		vals = []any{v.From, v.To}
	}
	for _, x := range vals {
		switch o := old.(type) {
		case string:
			d := DimOf(o)
			xs, ok := x.(string)
			if d == 0 {
				if !ok {
					return fmt.Errorf("the case has the string %q here, not %s", o, KindOf(x))
				}
				continue
			}
			if !ok {
				return fmt.Errorf("%s is %s with its unit (the case has %q), not %s: write it like %q", v.Key, article(d), o, KindOf(x), d.Example())
			}
			if _, err := units.Parse(xs, d); err != nil {
				if d == units.Temperature {
					if _, err2 := units.Parse(xs, units.TemperatureDifference); err2 == nil {
						continue // below absolute zero: that run fails
					}
				}
				return fmt.Errorf("%s is %s (the case has %q): %v", v.Key, article(d), o, err)
			}
		case int64, float64:
			switch x.(type) {
			case int64, float64:
			default:
				return fmt.Errorf("%s is a plain number (the case has %s), not %s", v.Key, Written(o), KindOf(x))
			}
		case bool:
			if _, ok := x.(bool); !ok {
				return fmt.Errorf("%s is true or false (the case has %v), not %s", v.Key, o, KindOf(x))
			}
		}
	}
	return nil
}

// CloneTree deep-copies a decoded TOML value.
func CloneTree(v any) any {
	switch x := v.(type) {
	case map[string]any:
		m := make(map[string]any, len(x))
		for k, e := range x {
			m[k] = CloneTree(e)
		}
		return m
	case []map[string]any:
		out := make([]map[string]any, len(x))
		for i, e := range x {
			out[i] = CloneTree(e).(map[string]any)
		}
		return out
	case []any:
		out := make([]any, len(x))
		for i, e := range x {
			out[i] = CloneTree(e)
		}
		return out
	}
	return v
}

// SetPath sets the value at a path found by resolveKey.
func SetPath(t map[string]any, path []string, v any) {
	var cur any = t
	for i, p := range path {
		last := i == len(path)-1
		switch x := cur.(type) {
		case map[string]any:
			if last {
				x[p] = v
				return
			}
			cur = x[p]
		case []map[string]any:
			j, _ := strconv.Atoi(p)
			cur = x[j]
		case []any:
			j, _ := strconv.Atoi(p)
			if last {
				x[j] = v
				return
			}
			cur = x[j]
		}
	}
}

// ResolveKey follows the sweep key path key through the decoded case doc
// and returns the path of keys and 0-based indices that the loader uses
// (a layer named in the key becomes its index: layer.potting.thickness ->
// layer.0.thickness), and whether the last key is present in the case.
//
// Every table and array element on the way must exist; the last key may be
// absent from its table (such as time.end), and it must not be a table or an
// array (vary one of their keys or elements instead). Elements of arrays of
// tables with a name key (layers) are found by name first, then by index.
// The error says what is missing and suggests the nearest existing key.
func ResolveKey(doc map[string]any, key string) (path []string, exists bool, err error) {
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
		if slices.Contains(topKeys, p) {
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
		return fmt.Errorf("the case has no [schedules.%s]%s", p, DidYouMeanKey(p, sortedKeys(m)))
	}
	return fmt.Errorf("%s has no %q%s (it has: %s)", where, p, DidYouMeanKey(p, sortedKeys(m)), strings.Join(sortedKeys(m), ", "))
}

func DidYouMeanKey(got string, valid []string) string {
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
		return -1, fmt.Sprintf("no element named %q%s (names: %s)", p, DidYouMeanKey(p, names), strings.Join(names, ", "))
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

// ListValue checks one element of a values list and returns it as shown in
// summary.csv and as it goes into the case: a string is normalised by
// normalizeQuantity, a number is written in its shortest form.
func ListValue(x any) (shown string, value any, err error) {
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
	return "", nil, fmt.Errorf("a varied value must be a single value (a string with its unit, a number or a boolean), got %s", KindOf(x))
}

// normalizeQuantity puts one space between the number and the unit of a
// quantity written without it ("12W/m^2/K" -> "12 W/m^2/K"), when the result
// is a valid quantity of some dimension; any other string is returned as it
// is (a schedule name such as "2nd-oven" stays whole).
func normalizeQuantity(s string) string {
	num, unit := SplitNumber(s)
	if num == "" || unit == "" || unit[0] == ' ' || unit[0] == '\t' {
		return s
	}
	spaced := num + " " + unit
	if DimOf(spaced) == 0 {
		return s
	}
	return spaced
}

// SplitNumber splits s into the decimal number at its start (sign, digits,
// point, exponent) and the rest; num is "" when s does not start with one.
func SplitNumber(s string) (num, rest string) {
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

// DimOf returns the first dimension, in the order of package units, that s
// reads as, or 0 when it reads as none.
func DimOf(s string) units.Dim {
	for d := units.Length; d <= units.Viscosity; d++ {
		if _, err := units.Parse(s, d); err == nil {
			return d
		}
	}
	return 0
}

// Span is a resolved range of a sweep: both ends in the unit of From (or
// plain numbers), so that a value between them is written in that unit.
type Span struct {
	From, To float64 // in unit (plain numbers when unit is "")
	Unit     string  // the unit of From as written, "" for plain numbers
	integer  bool    // both ends are whole numbers without unit: values are rounded to int64
	Decimals int     // decimals written: 9 significant digits of the larger end
}

// NewSpan resolves the ends of a range: both quantities of one dimension
// (To is converted to the unit of From), or both plain numbers.
//
// Method: the dimension is the first one both ends read as (units.Parse);
// To in the unit u of From is (To_SI − off)/scale with off = "0 u" and
// scale = "1 u" − off in SI, which is exact for the affine temperature
// scales too, so interpolating in u is interpolating linearly in SI.
func NewSpan(from, to any) (Span, error) {
	var sp Span
	switch f := from.(type) {
	case int64, float64:
		a, okA := PlainNumber(f)
		b, okB := PlainNumber(to)
		if !okA || !okB {
			return sp, fmt.Errorf("from = %s and to = %s must both be plain numbers, or both quantities with units", Written(from), Written(to))
		}
		_, intA := from.(int64)
		_, intB := to.(int64)
		sp = Span{From: a, To: b, integer: intA && intB}
	case string:
		t, ok := to.(string)
		if !ok {
			return sp, fmt.Errorf("from = %s and to = %s must both be quantities with units, or both plain numbers", Written(from), Written(to))
		}
		f, t = strings.TrimSpace(f), strings.TrimSpace(t)
		num, unit := SplitNumber(f)
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
		for d = units.Length; d <= units.Viscosity; d++ {
			if _, err := units.Parse(f, d); err != nil {
				continue
			}
			if bSI, err = units.Parse(t, d); err == nil {
				break
			}
		}
		if d > units.Viscosity {
			if fd := DimOf(f); fd != 0 {
				return sp, fmt.Errorf("to = %q is not %s like from = %q", t, article(fd), f)
			}
			return sp, fmt.Errorf("from = %q is not a quantity with a known unit", f)
		}
		off, err0 := units.Parse("0 "+unit, d)
		one, err1 := units.Parse("1 "+unit, d)
		if err0 != nil || err1 != nil || one == off {
			return sp, fmt.Errorf("from = %q: cannot convert to its unit %q", f, unit)
		}
		sp = Span{From: a, To: (bSI - off) / (one - off), Unit: unit}
	default:
		return sp, fmt.Errorf("from must be a quantity with its unit or a plain number, got %s", KindOf(from))
	}
	if math.IsNaN(sp.To) || math.IsInf(sp.To, 0) || math.IsNaN(sp.From) || math.IsInf(sp.From, 0) {
		return sp, fmt.Errorf("the ends of the range must be finite")
	}
	if sp.From == sp.To {
		return sp, fmt.Errorf("from and to are equal (%s): give a list of one value instead", Written(from))
	}
	big := max(math.Abs(sp.From), math.Abs(sp.To))
	sp.Decimals = max(0, min(20, 8-int(math.Floor(math.Log10(big)))))
	return sp, nil
}

func PlainNumber(x any) (float64, bool) {
	switch v := x.(type) {
	case int64:
		return float64(v), true
	case float64:
		return v, true
	}
	return 0, false
}

// At returns the value of the range at fraction f in [0, 1] (f = 1 gives To
// exactly), as shown in summary.csv and as it goes into the case:
//
//	v = From + (To − From)·f, in the unit of From
//
// rounded to 9 significant digits of the larger end (so 0.1 + 0.2 is shown
// as 0.3 and the run uses exactly the value shown), or to a whole number
// when both ends are integers.
func (sp Span) At(f float64) (shown string, value any) {
	v := sp.From + (sp.To-sp.From)*f
	if f == 1 {
		v = sp.To
	}
	if sp.integer {
		n := int64(math.Round(v))
		return strconv.FormatInt(n, 10), n
	}
	s := strconv.FormatFloat(v, 'f', sp.Decimals, 64)
	if strings.Contains(s, ".") {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	if s == "-0" {
		s = "0"
	}
	if sp.Unit == "" {
		x, _ := strconv.ParseFloat(s, 64)
		return s, x
	}
	s += " " + sp.Unit
	return s, s
}

// ScalarText classifies a value typed on the command line as TOML would:
// true/false are booleans, an integer or a decimal number is a number,
// anything else is a string (a quantity with its unit, normalised, or a
// name).
func ScalarText(s string) any {
	s = strings.TrimSpace(s)
	switch s {
	case "true":
		return true
	case "false":
		return false
	}
	if num, rest := SplitNumber(s); num != "" && rest == "" {
		if n, err := strconv.ParseInt(num, 10, 64); err == nil {
			return n
		}
		if x, err := strconv.ParseFloat(num, 64); err == nil && !math.IsInf(x, 0) {
			return x
		}
	}
	return normalizeQuantity(s)
}

// CaseVariant is a case file whose decoded values can be replaced before the
// normal loader validates it again, as a sweep run does: positions in
// messages still come from the text.
type CaseVariant struct {
	Name, Text, dir string
	Doc             map[string]any // only read
}

// NewCaseVariant decodes the case text data; the case itself must be valid.
func NewCaseVariant(name string, data []byte, dir string) (*CaseVariant, *Case, error) {
	scan, err := preScan(name, data)
	if err != nil {
		return nil, nil, err
	}
	text := string(data)
	var doc map[string]any
	if _, err := toml.Decode(text, &doc); err != nil {
		return nil, nil, ErrorList{syntaxError(name, text, err, scan)}
	}
	c, err := parseTree(context.Background(), name, text, doc, dir)
	if err != nil {
		return nil, nil, err
	}
	return &CaseVariant{Name: name, Text: text, dir: dir, Doc: doc}, c, nil
}

// ValueSetting is one replaced value: a path found by resolveKey and the value.
type ValueSetting struct {
	Path  []string
	Value any
}

// Tree returns a deep copy of the decoded case with sets applied in order;
// a valueSetting of time.end creates [time] when the case has none.
func (v *CaseVariant) Tree(sets []ValueSetting) map[string]any {
	t := CloneTree(v.Doc).(map[string]any)
	for _, s := range sets {
		if len(s.Path) == 2 && s.Path[0] == "time" {
			if _, ok := t["time"].(map[string]any); !ok {
				t["time"] = map[string]any{}
			}
		}
		SetPath(t, s.Path, s.Value)
	}
	return t
}

// Parse validates the tree t (from tree). A probe of [output] that the
// values put below the stack (a thinner layer) is dropped rather than
// failing the case, as in a sweep run: probes do not enter the summary.
func (v *CaseVariant) Parse(t map[string]any) (*Case, error) {
	return parseDroppingProbes(v.Name, v.Text, v.dir, t, func(string) bool { return false })
}

// SweepSection returns the [sweep] section of the case (empty when it has
// none). The case was validated by newCaseVariant, so it has no errors.
func (v *CaseVariant) SweepSection() *SweepSpec {
	l := &loader{file: v.Name, dir: v.dir, loc: tomltext.Locate(v.Text)}
	if spec := l.sweepSection(&table{m: v.Doc}); spec != nil {
		return spec
	}
	return &SweepSpec{}
}

// ErrorAt returns an error of the given kind positioned at the value of the
// key path key in the case file.
func (v *CaseVariant) ErrorAt(key string, kind error, msg string) error {
	p := tomltext.Locate(v.Text).Value(key)
	return ErrorList{{File: v.Name, Line: p.Line, Col: p.Col, Key: key, Err: &detail{Kind: kind, Msg: msg}}}
}

// Validate checks the tree t (from tree) like a case file.
func (v *CaseVariant) Validate(t map[string]any) error {
	_, err := parseTree(context.Background(), v.Name, v.Text, t, v.dir)
	return err
}

// ParseKeeping validates the tree t like parse, but a probe below the stack
// fails the case when keep(its key path) says so (see parseDroppingProbes).
func (v *CaseVariant) ParseKeeping(t map[string]any, keep func(path string) bool) (*Case, error) {
	return parseDroppingProbes(v.Name, v.Text, v.dir, t, keep)
}

// InUnit returns the value v (a quantity string such as "15 W/m^2/K", or a
// plain number) in unit (a plain number is returned as it is):
//
//	v_unit = (v_SI − off)/(one − off),  off = "0 unit" and one = "1 unit" in SI,
//
// exact for the affine temperature scales too. ok is false when v is not a
// quantity of a known dimension or unit is not a unit of that dimension.
func InUnit(v any, unit string) (x float64, ok bool) {
	switch x := v.(type) {
	case int64, float64:
		return PlainNumber(x)
	case string:
		d := DimOf(x)
		if d == 0 {
			return 0, false
		}
		si, err := units.Parse(x, d)
		off, err0 := units.Parse("0 "+unit, d)
		one, err1 := units.Parse("1 "+unit, d)
		if err != nil || err0 != nil || err1 != nil || one == off {
			return 0, false
		}
		return (si - off) / (one - off), true
	}
	return 0, false
}

// TextPos is a place in a case text: 1-based line and byte column. The zero
// TextPos means "not in the text".
type TextPos struct{ Line, Col int }

// Positions returns where the value at path (a key path as ResolveKey
// returns it) starts in the case text, and where the header of the table
// holding it starts ([top], the [[layer]] of a layer). Either is the zero
// TextPos when the text does not have it: a value left to its default, a
// table written inline or only through dotted keys.
//
// Cost: one pass over the text (the locator of the loader).
func (v *CaseVariant) Positions(path []string) (value, header TextPos) {
	l := tomltext.Locate(v.Text)
	key := strings.Join(path, ".")
	if p, ok := l.ValueAt(key); ok {
		value = TextPos{p.Line, p.Col}
	}
	if len(path) > 1 {
		if p, ok := l.HeaderAt(strings.Join(path[:len(path)-1], ".")); ok {
			header = TextPos{p.Line, p.Col}
		}
	}
	return value, header
}
