package cases

import (
	"context"
	"cureslab/cases/tomltext"
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"

	"cureslab/cases/units"
)

// loader is the state of one Parse: the text, the positions in it and the
// errors found so far. Every reading method reports its own errors and
// returns ok = false, so that one pass collects every problem.
type loader struct {
	file string // name used in messages
	dir  string // directory of relative paths
	ctx  context.Context
	loc  *tomltext.Locator
	errs ErrorList
	// suggested holds the key paths offered as "did you mean" for an
	// unknown key; require does not also report them as missing, and
	// [uncertainty] does not report them as absent.
	suggested map[string]bool
	// unknown holds the key paths reported as unknown keys; no message
	// offers them as a suggestion.
	unknown map[string]bool
}

// add records an error at p for key path key.
func (l *loader) add(p pos, key string, kind, cause error, msg string) *Error {
	e := &Error{File: l.file, Line: p.Line, Col: p.Col, Key: key, Err: &detail{Kind: kind, Cause: cause, Msg: msg}}
	l.errs = append(l.errs, e)
	return e
}

// atValue records an error positioned at the value of key path key.
func (l *loader) atValue(key string, kind error, format string, args ...any) *Error {
	return l.add(l.loc.Value(key), key, kind, nil, fmt.Sprintf(format, args...))
}

// atKey records an error positioned at the key path key.
func (l *loader) atKey(key string, kind error, format string, args ...any) *Error {
	at := l.loc.KeyNear(key)
	return l.add(at, key, kind, nil, fmt.Sprintf(format, args...))
}

// table is a TOML table of the case being read.
type table struct {
	path string // key path of the table, "" for the document
	m    map[string]any
}

func (t *table) keyPath(key string) string { return tomltext.JoinKey(t.path, key) }

func (t *table) has(key string) bool {
	if t == nil {
		return false
	}
	_, ok := t.m[key]
	return ok
}

// open checks that v (found at path) is a table whose keys are all in valid.
// An unknown key is reported with the nearest valid key; note, when not
// nil, may explain a key that is valid elsewhere (A2 with an nth-order
// model). It returns nil when v is not a table.
func (l *loader) open(path string, v any, valid []string, note func(key string) string) *table {
	m, ok := v.(map[string]any)
	if !ok {
		l.atValue(path, ErrType, "must be a table, got %s", KindOf(v)).Hint =
			fmt.Sprintf("write it as a section [%s] with keys inside, or as an inline table { key = value, ... }", path)
		return nil
	}
	t := &table{path: path, m: m}
	for _, k := range sortedKeys(m) {
		if slices.Contains(valid, k) {
			continue
		}
		kp := t.keyPath(k)
		if l.unknown == nil {
			l.unknown = make(map[string]bool)
		}
		l.unknown[kp] = true
		if note != nil {
			if s := note(k); s != "" {
				l.atKey(kp, ErrUnknownKey, "unknown key %q: %s", k, s)
				continue
			}
		}
		msg := fmt.Sprintf("unknown key %q", k)
		if s := Suggest(k, valid); s != "" {
			msg += fmt.Sprintf("; did you mean %q?", s)
			if l.suggested == nil {
				l.suggested = make(map[string]bool)
			}
			l.suggested[t.keyPath(s)] = true
		}
		e := l.atKey(kp, ErrUnknownKey, "%s", msg)
		where := "here"
		if path != "" {
			where = "in " + describeTable(path)
		}
		e.Hint = fmt.Sprintf("valid keys %s: %s", where, strings.Join(valid, ", "))
	}
	return t
}

// describeTable names the table at path for a hint: [time], [[layer]] 2, ...
func describeTable(path string) string {
	parts := strings.Split(path, ".")
	if parts[0] == "layer" && len(parts) == 2 {
		return "a [[layer]]"
	}
	return "[" + path + "]"
}

// sub opens the optional sub-table key of t; nil when it is absent or not
// a table.
func (l *loader) sub(t *table, key string, valid []string, note func(string) string) *table {
	if t == nil || !t.has(key) {
		return nil
	}
	return l.open(t.keyPath(key), t.m[key], valid, note)
}

// require reports every key of keys that t lacks, at the table's position.
// It returns false if any is missing.
func (l *loader) require(t *table, keys ...string) bool {
	if t == nil {
		return false
	}
	ok := true
	for _, k := range keys {
		if !t.has(k) && l.suggested[t.keyPath(k)] {
			ok = false // a misspelt key already reported with this suggestion
		} else if !t.has(k) {
			l.add(l.loc.Table(t.path), t.keyPath(k), ErrMissing, nil, fmt.Sprintf("missing: %s needs %q", describeTable(t.path), k))
			ok = false
		}
	}
	return ok
}

// quantity reads the optional dimensional value key of t (a string with its
// unit) in the SI unit of d. ok is false when it is absent or invalid.
func (l *loader) quantity(t *table, key string, d units.Dim) (float64, bool) {
	if !t.has(key) {
		return 0, false
	}
	return l.quantityAt(t.keyPath(key), t.m[key], d)
}

// quantityAt reads the dimensional value v found at key path path.
func (l *loader) quantityAt(path string, v any, d units.Dim) (float64, bool) {
	name := lastKey(path)
	example := fmt.Sprintf("for example: %s = %q", name, d.Example())
	if isIndex(name) {
		example = fmt.Sprintf("for example: %q", d.Example())
	}
	switch x := v.(type) {
	case string:
		q, err := units.Parse(x, d)
		if err != nil { // the message quotes the input and shows the right form
			l.add(l.loc.Value(path), path, ErrUnit, err, err.Error())
			return 0, false
		}
		if math.IsNaN(q) || math.IsInf(q, 0) {
			l.atValue(path, ErrRange, "%q is not a finite %s", x, d)
			return 0, false
		}
		return q, true
	case int64, float64:
		e := l.atValue(path, ErrUnit, "the bare number %v needs a unit: expected %s", x, article(d))
		e.Hint = "write the value as a string with its unit, " + example
		return 0, false
	}
	e := l.atValue(path, ErrType, "expected %s as a string with its unit, got %s", article(d), KindOf(v))
	e.Hint = example
	return 0, false
}

// number reads the optional dimensionless value key of t.
func (l *loader) number(t *table, key string) (float64, bool) {
	if !t.has(key) {
		return 0, false
	}
	return l.numberAt(t.keyPath(key), t.m[key])
}

// numberAt reads the dimensionless value v found at key path path.
func (l *loader) numberAt(path string, v any) (float64, bool) {
	var f float64
	switch x := v.(type) {
	case int64:
		f = float64(x)
	case float64:
		f = x
	case string:
		e := l.atValue(path, ErrType, "expected a plain number (it is dimensionless), got the string %q", x)
		if _, err := strconv.ParseFloat(strings.TrimSpace(x), 64); err == nil {
			e.Hint = fmt.Sprintf("write it without quotes: %s = %s", lastKey(path), strings.TrimSpace(x))
		}
		return 0, false
	default:
		l.atValue(path, ErrType, "expected a plain number, got %s", KindOf(v))
		return 0, false
	}
	if math.IsNaN(f) || math.IsInf(f, 0) {
		l.atValue(path, ErrRange, "must be a finite number, got %v", f)
		return 0, false
	}
	return f, true
}

// integer reads the optional whole number key of t.
func (l *loader) integer(t *table, key string) (int64, bool) {
	if !t.has(key) {
		return 0, false
	}
	path := t.keyPath(key)
	switch x := t.m[key].(type) {
	case int64:
		return x, true
	case float64:
		l.atValue(path, ErrType, "expected a whole number, got %v", x).Hint =
			fmt.Sprintf("write it without a decimal point, for example: %s = 40", key)
	default:
		l.atValue(path, ErrType, "expected a whole number, got %s", KindOf(t.m[key]))
	}
	return 0, false
}

// str reads the optional string key of t.
func (l *loader) str(t *table, key string) (string, bool) {
	if !t.has(key) {
		return "", false
	}
	s, ok := t.m[key].(string)
	if !ok {
		l.atValue(t.keyPath(key), ErrType, "expected a string, got %s", KindOf(t.m[key]))
	}
	return s, ok
}

// boolean reads the optional boolean key of t.
func (l *loader) boolean(t *table, key string) (bool, bool) {
	if !t.has(key) {
		return false, false
	}
	b, ok := t.m[key].(bool)
	if !ok {
		l.atValue(t.keyPath(key), ErrType, "expected true or false, got %s", KindOf(t.m[key]))
	}
	return b, ok
}

// array reads the optional array key of t.
func (l *loader) array(t *table, key string) ([]any, bool) {
	if !t.has(key) {
		return nil, false
	}
	return l.arrayAt(t.keyPath(key), t.m[key])
}

func (l *loader) arrayAt(path string, v any) ([]any, bool) {
	switch x := v.(type) {
	case []any:
		return x, true
	case []map[string]any:
		out := make([]any, len(x))
		for i := range x {
			out[i] = x[i]
		}
		return out, true
	}
	l.atValue(path, ErrType, "expected an array [ ... ], got %s", KindOf(v))
	return nil, false
}

// rangeErr records a range error at the value of key path path; v is the
// value as written.
func (l *loader) rangeErr(path string, v any, format string, args ...any) *Error {
	return l.atValue(path, ErrRange, "%s, got %s", fmt.Sprintf(format, args...), Written(v))
}

// Written formats a TOML value as the user wrote it.
func Written(v any) string {
	switch x := v.(type) {
	case string:
		return strconv.Quote(x)
	case nil:
		return "nothing"
	}
	return fmt.Sprint(v)
}

// KindOf names the TOML type of v for a message.
func KindOf(v any) string {
	switch x := v.(type) {
	case string:
		return fmt.Sprintf("the string %q", x)
	case int64:
		return fmt.Sprintf("the integer %d", x)
	case float64:
		return fmt.Sprintf("the number %v", x)
	case bool:
		return fmt.Sprintf("the boolean %v", x)
	case []any, []map[string]any:
		return "an array"
	case map[string]any:
		return "a table"
	case nil:
		return "nothing"
	}
	return fmt.Sprintf("the date/time %v", v)
}

func sortedKeys(m map[string]any) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

func lastKey(path string) string {
	if i := strings.LastIndexByte(path, '.'); i >= 0 {
		return path[i+1:]
	}
	return path
}

func isIndex(s string) bool {
	_, err := strconv.Atoi(s)
	return err == nil
}

// Celsius formats an absolute temperature in K for a message.
func Celsius(T float64) string { return strconv.FormatFloat(T-273.15, 'g', 6, 64) + " C" }

// article returns the dimension word of d with its article: "a length",
// "an energy per mass".
func article(d units.Dim) string { return d.WithArticle() }
