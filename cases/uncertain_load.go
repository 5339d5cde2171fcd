package cases

import (
	"cureslab/cases/tomltext"
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"
	"unicode"

	"cureslab/cases/units"
)

// The distributions of an uncertain input (README, Case file reference).
const (
	DistUniform = "uniform" // the value is spread evenly over nominal ± spread
	DistNormal  = "normal"  // Gaussian, the spread is 2σ
)

// defaultShare is the share of samples that must meet the criteria when
// [uncertainty] gives no share.
const defaultShare = 0.95

var (
	uncertaintyEntryKeys = []string{"spread", "distribution"}
	distributions        = []string{DistUniform, DistNormal}
)

// Uncertainty is the [uncertainty] section of a case (README, Case file reference): the inputs
// whose values are not known exactly, and the share of samples that must
// meet the criteria.
type Uncertainty struct {
	Inputs []UncertainInput // in the order of the case file
	Share  float64          // in (0, 1]; defaultShare when not given
}

// UncertainInput is one uncertain value of a case: the value at Key (a key
// path as in sweeps, such as "top.h" or "layer.potting.thickness") is
//
//	uniform: nominal + w·(2u − 1)
//	normal:  nominal + (w/2)·Φ⁻¹(u)
//
// for a sample u in (0, 1), with the half-width w = Abs (SI units of the
// key) or w = Rel·|nominal| (a percentage). For an absolute temperature the
// spread is a temperature difference and a percentage is refused.
type UncertainInput struct {
	Key          string  // as written in [uncertainty]
	Spread       string  // as written: "±20 %", "±1.5 kJ/mol"
	Distribution string  // DistUniform or DistNormal
	Abs, Rel     float64 // half-width: Abs in SI (Rel = 0), or Rel as a fraction (Abs = 0)

	Path []string // resolved path in the decoded case (layer names become indices)
}

// uncertaintySection reads and checks [uncertainty] (README, Case file reference) of the
// decoded case root: every key path must lead to a number or a quantity of
// the case (as sweep keys do, resolveKey), each spread must be a spread of
// that quantity's dimension (units.ParseSpread), the distribution uniform
// or normal, share in (0, 1]. A nested table that is not an entry
// ({ spread, distribution }) is a group of dotted keys: top.h = "±20 %"
// written without quotes is the same as "top.h" = "±20 %". It returns nil
// when the case has no [uncertainty] or it has errors (reported in l).
func (l *loader) uncertaintySection(root *table) *Uncertainty {
	if !root.has("uncertainty") {
		return nil
	}
	m, ok := root.m["uncertainty"].(map[string]any)
	if !ok {
		l.atValue("uncertainty", ErrType, "must be a table, got %s", KindOf(root.m["uncertainty"])).Hint =
			"write it as a section:\n[uncertainty]\n\"top.h\" = \"±20 %\""
		return nil
	}
	before := len(l.errs)
	u := &Uncertainty{Share: defaultShare}
	type placed struct {
		in UncertainInput
		at pos
	}
	var found []placed
	seen := make(map[string]string) // resolved path -> key as written
	var walk func(prefix string, m map[string]any)
	walk = func(prefix string, m map[string]any) {
		for _, k := range sortedKeys(m) {
			key := tomltext.JoinKey(prefix, k)
			lp := "uncertainty." + key // the loader's key path, for positions
			if prefix == "" && k == "share" {
				if s, ok := l.numberAt(lp, m[k]); ok {
					if !(s > 0 && s <= 1) {
						l.rangeErr(lp, m[k], "share must be in (0, 1]")
					}
					u.Share = s
				}
				continue
			}
			spread, dist := "", DistUniform
			switch x := m[k].(type) {
			case string:
				spread = x
			case map[string]any:
				_, hasSpread := x["spread"]
				_, hasDist := x["distribution"]
				if !hasSpread && !hasDist {
					if len(x) == 0 {
						l.atValue(lp, ErrMissing, "an uncertain input needs a spread").Hint = uncertaintyHint
						continue
					}
					walk(key, x) // a group of dotted keys
					continue
				}
				var ok bool
				if spread, dist, lp, ok = l.uncertaintyEntry(lp, x); !ok {
					continue
				}
			default:
				l.atValue(lp, ErrType, "expected a spread such as \"±20 %%\", got %s", KindOf(m[k])).Hint = uncertaintyHint
				continue
			}
			in, ok := l.uncertainInput(root, key, lp, spread, dist)
			if !ok {
				continue
			}
			p := strings.Join(in.Path, ".")
			if prev, dup := seen[p]; dup {
				l.atKey("uncertainty."+key, ErrDuplicate, "%q is the same value as %q, which is already uncertain", key, prev)
				continue
			}
			seen[p] = key
			found = append(found, placed{in, l.loc.Key("uncertainty." + key)})
		}
	}
	walk("", m)
	if len(l.errs) > before {
		return nil
	}
	sort.SliceStable(found, func(i, j int) bool {
		a, b := found[i].at, found[j].at
		if a.Line != b.Line {
			return a.Line < b.Line
		}
		return a.Col < b.Col
	})
	for _, f := range found {
		u.Inputs = append(u.Inputs, f.in)
	}
	return u
}

// uncertaintyEntry reads the entry { spread, distribution } at the key
// path lp: the spread as written, the distribution (uniform by default)
// and the key path of the spread, for positions; ok is false if the entry
// has errors (reported in l).
func (l *loader) uncertaintyEntry(lp string, x map[string]any) (spread, dist, at string, ok bool) {
	t := l.open(lp, x, uncertaintyEntryKeys, nil)
	if !l.require(t, "spread") {
		return "", "", "", false
	}
	if spread, ok = l.str(t, "spread"); !ok {
		return "", "", "", false
	}
	dist = DistUniform
	if d, ok := l.str(t, "distribution"); ok {
		if !slices.Contains(distributions, d) {
			e := l.rangeErr(t.keyPath("distribution"), d, "distribution must be %q or %q", DistUniform, DistNormal)
			if g := Suggest(d, distributions); g != "" {
				e.Hint = fmt.Sprintf("did you mean distribution = %q?", g)
			}
			return "", "", "", false
		}
		dist = d
	} else if t.has("distribution") {
		return "", "", "", false
	}
	return spread, dist, t.keyPath("spread"), true
}

const uncertaintyHint = "for example:\n[uncertainty]\n\"top.h\" = \"±20 %\"\n\"layer.potting.thickness\" = { spread = \"±0.3 mm\", distribution = \"normal\" }"

// uncertainInput checks one entry: key (a sweep key path) with the spread
// written at the loader key path lp.
func (l *loader) uncertainInput(root *table, key, lp, spread, dist string) (UncertainInput, bool) {
	in := UncertainInput{Key: key, Spread: spread, Distribution: dist}
	path, exists, err := ResolveKey(root.m, key)
	if err != nil {
		l.atKey("uncertainty."+key, ErrReference, "%v", err)
		return in, false
	}
	if !exists {
		if l.suggested[strings.Join(path, ".")] {
			// The key is misspelt where it is set: the unknown-key
			// message says so and offers this one.
			return in, false
		}
		hint := ""
		if m, ok := Leaf(root.m, path[:len(path)-1]).(map[string]any); ok {
			var known []string
			for _, k := range sortedKeys(m) {
				if !l.unknown[strings.Join(append(slices.Clip(path[:len(path)-1]), k), ".")] {
					known = append(known, k)
				}
			}
			hint = DidYouMeanKey(path[len(path)-1], known)
		}
		l.atKey("uncertainty."+key, ErrReference, "the case has no value at %s to be uncertain%s", key, hint).Hint =
			"only a value written in the case can be uncertain: set it in the case first"
		return in, false
	}
	if path[len(path)-1] == "cells" {
		l.atKey("uncertainty."+key, ErrType, "%s is a number of cells, which cannot be uncertain", key)
		return in, false
	}
	in.Path = path
	switch old := Leaf(root.m, path).(type) {
	case string:
		d := DimOf(old)
		if d == 0 {
			l.atKey("uncertainty."+key, ErrType, "%s is %q, not a quantity with a unit: only numbers and quantities can be uncertain", key, old)
			return in, false
		}
		abs, rel, err := units.ParseSpread(spread, d)
		if err != nil {
			l.add(l.loc.Value(lp), lp, ErrUnit, err, fmt.Sprintf("%v (%s is %s: %q)", err, key, article(d), old))
			return in, false
		}
		in.Abs, in.Rel = abs, rel
	case int64, float64:
		abs, rel, err := uncPlainSpread(spread)
		if err != nil {
			l.atValue(lp, ErrUnit, "%q %v (%s is the plain number %s)", spread, err, key, Written(old))
			return in, false
		}
		in.Abs, in.Rel = abs, rel
	default:
		l.atKey("uncertainty."+key, ErrType, "%s is %s: only numbers and quantities can be uncertain", key, KindOf(old))
		return in, false
	}
	return in, true
}

// uncPlainSpread reads the spread of a dimensionless value: "±20 %" (rel) or
// "±0.05" (abs), with "+/-" or "+-" for "±".
func uncPlainSpread(s string) (abs, rel float64, err error) {
	text := strings.TrimFunc(s, unicode.IsSpace)
	rest, ok := "", false
	for _, pm := range []string{"±", "+/-", "+-"} {
		if r, found := strings.CutPrefix(text, pm); found {
			rest, ok = strings.TrimFunc(r, unicode.IsSpace), true
			break
		}
	}
	if !ok {
		return 0, 0, errors.New(`is not a spread; write it like "±0.05" or "±20 %"`)
	}
	num, pct := strings.CutSuffix(rest, "%")
	num = strings.TrimFunc(num, unicode.IsSpace)
	x, perr := strconv.ParseFloat(num, 64)
	if n, r := SplitNumber(num); perr != nil || n == "" || r != "" || math.IsInf(x, 0) {
		return 0, 0, errors.New(`needs a plain number after "±"; write it like "±0.05" or "±20 %"`)
	}
	if x < 0 {
		return 0, 0, errors.New(`is negative; a spread is a size, write it like "±0.05"`)
	}
	if pct {
		return 0, x / 100, nil
	}
	return x, 0, nil
}

// ReadUncertainty returns the [uncertainty] of the case text (decoded as
// doc), nil when it has none, or the errors of that section.
func ReadUncertainty(name, text string, doc map[string]any) (*Uncertainty, error) {
	l := &loader{file: name, loc: tomltext.Locate(text)}
	u := l.uncertaintySection(&table{m: doc})
	if err := l.errs.sortFor(name).Err(); err != nil {
		return nil, err
	}
	return u, nil
}
