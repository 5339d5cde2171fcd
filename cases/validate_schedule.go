package cases

import (
	"bytes"
	"context"
	"cureslab/cases/limits"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"slices"
	"sort"
	"strconv"
	"strings"

	"cureslab/cases/units"
	"cureslab/physics"
)

var (
	scheduleKeys = []string{"start", "segments", "points", "file"}
	segmentKeys  = []string{"ramp", "to", "hold"}

	faceKinds = []string{"convection", "fixed", "flux", "insulated"}
	faceKeys  = map[string][]string{
		"convection": {"kind", "h", "air", "emissivity"},
		"fixed":      {"kind", "temperature"},
		"flux":       {"kind", "flux", "h", "air", "emissivity"},
		"insulated":  {"kind"},
	}
	allFaceKeys = []string{"kind", "h", "air", "emissivity", "temperature", "flux"}
)

// scheduleHeader is the header a schedule file must start with.
var scheduleHeader = []string{"time_s", "temperature_C"}

// MaxFileErrors bounds the errors reported for one schedule file.
const MaxFileErrors = 10

// schedules reads every [schedules.X]. A schedule with errors maps to nil,
// so that faces using it do not also report it as unknown.
func (l *loader) schedules(root *table) map[string]*physics.Schedule {
	defs := make(map[string]*physics.Schedule)
	if !root.has("schedules") {
		return defs
	}
	all, ok := root.m["schedules"].(map[string]any)
	if !ok {
		l.atValue("schedules", ErrType, "must be a table of schedules, got %s", KindOf(root.m["schedules"])).Hint =
			"write each schedule as a section: [schedules.NAME]"
		return defs
	}
	for _, name := range sortedKeys(all) {
		defs[name] = l.schedule("schedules."+name, all[name])
	}
	return defs
}

// schedule reads one [schedules.X]: start + segments, points, or file.
func (l *loader) schedule(path string, v any) *physics.Schedule {
	t := l.open(path, v, scheduleKeys, nil)
	if t == nil {
		return nil
	}
	var forms []string
	for _, k := range []string{"segments", "points", "file"} {
		if t.has(k) {
			forms = append(forms, k)
		}
	}
	switch {
	case len(forms) == 0:
		l.add(l.loc.Table(path), path, ErrMissing, nil, "a schedule needs segments (with start), points or file").Hint =
			"for example: start = \"23 C\" and segments = [{ ramp = \"2 C/min\", to = \"120 C\" }, { hold = \"60 min\" }]"
		return nil
	case len(forms) > 1:
		l.atKey(t.keyPath(forms[1]), ErrRange, "a schedule is given by one of segments, points or file, not by both %s and %s", forms[0], forms[1])
		return nil
	}
	if t.has("start") && forms[0] != "segments" {
		l.atKey(t.keyPath("start"), ErrRange, "start goes with segments only; %s give their own first value", forms[0])
		return nil
	}
	var s physics.Schedule
	var ok bool
	switch forms[0] {
	case "segments":
		s, ok = l.segments(t)
	case "points":
		s, ok = l.points(t.keyPath("points"), t.m["points"], units.Temperature)
	case "file":
		if name, isStr := l.str(t, "file"); isStr {
			s, ok = l.scheduleFile(t.keyPath("file"), name)
		}
	}
	if !ok {
		return nil
	}
	return &s
}

// segments reads start and segments: ramps { ramp, to } and holds { hold }.
// Every ramp is checked against the temperature it starts from (a zero
// rate, a rate pointing away from its to, or a to equal to the start never
// reaches its to).
func (l *loader) segments(t *table) (physics.Schedule, bool) {
	before := len(l.errs)
	l.require(t, "start")
	start, known := l.quantity(t, "start", units.Temperature)
	arr, ok := l.array(t, "segments")
	if !ok {
		return physics.Schedule{}, false
	}
	if len(arr) == 0 {
		l.atValue(t.keyPath("segments"), ErrRange, "a schedule needs at least one segment")
		return physics.Schedule{}, false
	}
	cur := start
	segs := make([]physics.Segment, len(arr))
	for i, v := range arr {
		sp := fmt.Sprintf("%s.%d", t.keyPath("segments"), i)
		st := l.open(sp, v, segmentKeys, nil)
		if st == nil {
			known = false
			continue
		}
		switch {
		case st.has("hold"):
			for _, k := range []string{"ramp", "to"} {
				if st.has(k) {
					l.atKey(st.keyPath(k), ErrRange, "a segment is a ramp { ramp, to } or a hold { hold }, not both")
				}
			}
			h, ok := l.quantity(st, "hold", units.Time)
			if ok && !(h > 0) {
				l.rangeErr(st.keyPath("hold"), st.m["hold"], "a hold must last a positive time")
			}
			segs[i].Hold = h
		case st.has("ramp") || st.has("to"):
			l.require(st, "ramp", "to")
			rate, okRate := l.quantity(st, "ramp", units.HeatingRate)
			to, okTo := l.quantity(st, "to", units.Temperature)
			segs[i].Rate, segs[i].To = rate, to
			switch {
			case okRate && rate == 0:
				l.rangeErr(st.keyPath("ramp"), st.m["ramp"], "a ramp needs a nonzero rate")
			case !okRate || !okTo || !known:
			case to == cur:
				l.atValue(st.keyPath("to"), ErrRange, "the ramp never gets anywhere: its to equals the temperature it starts from (%s)", Celsius(cur))
			case (to-cur)*rate < 0:
				dir := "falls"
				if rate > 0 {
					dir = "rises"
				}
				l.atValue(st.keyPath("ramp"), ErrRange, "the ramp never reaches its to = %s: at %s the temperature %s from %s, away from it",
					Written(st.m["to"]), Written(st.m["ramp"]), dir, Celsius(cur)).Hint = "the sign of the rate must point toward to (a negative rate cools)"
			}
			cur, known = to, okTo
		case len(st.m) > 0: // only unknown keys, reported by open
		default:
			l.add(l.loc.Value(sp), sp, ErrMissing, nil, "a segment needs ramp and to, or hold").Hint =
				"for example: { ramp = \"2 C/min\", to = \"120 C\" } or { hold = \"60 min\" }"
		}
	}
	if len(l.errs) > before {
		return physics.Schedule{}, false
	}
	s, err := physics.FromSegments(start, segs)
	if err != nil { // not reached: every segment was checked above
		key := t.keyPath("segments")
		var se *physics.SegmentError
		if errors.As(err, &se) {
			key = fmt.Sprintf("%s.%d", key, se.Index)
		}
		l.add(l.loc.Value(key), key, ErrRange, err, err.Error())
		return physics.Schedule{}, false
	}
	return s, true
}

// points reads [[time, value], ...] with times not negative and strictly
// increasing, values of dimension d.
func (l *loader) points(path string, v any, d units.Dim) (physics.Schedule, bool) {
	arr, ok := l.arrayAt(path, v)
	if !ok {
		return physics.Schedule{}, false
	}
	if len(arr) == 0 {
		l.atValue(path, ErrRange, "needs at least one point [time, value]")
		return physics.Schedule{}, false
	}
	times := make([]float64, 0, len(arr))
	vals := make([]float64, 0, len(arr))
	for i, pv := range arr {
		pp := fmt.Sprintf("%s.%d", path, i)
		pair, isArr := pv.([]any)
		if !isArr || len(pair) != 2 {
			l.atValue(pp, ErrType, "a point is a pair [time, value], got %s", KindOf(pv)).Hint =
				fmt.Sprintf("for example: [\"10 min\", %q]", d.Example())
			ok = false
			continue
		}
		tm, ok1 := l.quantityAt(pp+".0", pair[0], units.Time)
		x, ok2 := l.quantityAt(pp+".1", pair[1], d)
		if !ok1 || !ok2 {
			ok = false
			continue
		}
		switch {
		case tm < 0:
			l.rangeErr(pp+".0", pair[0], "times must not be negative")
			ok = false
		case len(times) > 0 && !(tm > times[len(times)-1]):
			l.rangeErr(pp+".0", pair[0], "times must be strictly increasing (the point before is at %g s)", times[len(times)-1])
			ok = false
		}
		times = append(times, tm)
		vals = append(vals, x)
	}
	if !ok {
		return physics.Schedule{}, false
	}
	s, err := physics.NewSchedule(times, vals)
	if err != nil { // not reached: checked above
		l.add(l.loc.Value(path), path, ErrRange, err, err.Error())
		return physics.Schedule{}, false
	}
	return s, true
}

// scheduleFile reads a logged temperature program: a CSV file with the
// header time_s,temperature_C and one row per point, times not negative and
// strictly increasing. name is relative to the case's directory. Errors
// point into the CSV file (at most maxFileErrors of them).
func (l *loader) scheduleFile(key, name string) (physics.Schedule, bool) {
	full := name
	if !filepath.IsAbs(name) && l.dir != "" {
		full = filepath.Join(l.dir, name)
	}
	ctx := l.ctx
	if ctx == nil {
		ctx = context.Background()
	}
	data, err := limits.ReadFile(ctx, full, limits.MaxFileSize)
	if err != nil {
		l.add(l.loc.Value(key), key, ErrFile, err, fmt.Sprintf("cannot read the schedule file: %v", err))
		return physics.Schedule{}, false
	}
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	n := 0
	fail := func(line, col int, cause error, format string, args ...any) {
		if n < MaxFileErrors {
			l.errs = append(l.errs, &Error{File: full, Line: line, Col: col, Key: key,
				Err: &detail{Kind: ErrFile, Cause: cause, Msg: fmt.Sprintf(format, args...)}})
		}
		n++
	}
	r := csv.NewReader(bytes.NewReader(data))
	r.FieldsPerRecord = -1
	r.TrimLeadingSpace = true
	r.Comment = '#'
	var times, vals []float64
	for row := 0; ; row++ {
		rec, err := r.Read()
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				fail(pe.Line, pe.Column, err, "%v", pe.Err)
				break
			}
			if !errors.Is(err, io.EOF) {
				fail(0, 0, err, "%v", err)
			}
			break
		}
		line, _ := r.FieldPos(0)
		if row == 0 {
			if len(rec) != 2 || strings.TrimSpace(rec[0]) != scheduleHeader[0] || strings.TrimSpace(rec[1]) != scheduleHeader[1] {
				fail(line, 1, nil, "the first line must be the header %s, got %q", strings.Join(scheduleHeader, ","), strings.Join(rec, ","))
				break
			}
			continue
		}
		if len(rec) != 2 {
			fail(line, 1, nil, "a row has 2 fields (%s), this one has %d", strings.Join(scheduleHeader, ","), len(rec))
			continue
		}
		var x [2]float64
		good := true
		for i, f := range rec {
			v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				ln, col := r.FieldPos(i)
				fail(ln, col, nil, "%s %q is not a finite number", scheduleHeader[i], f)
				good = false
			}
			x[i] = v
		}
		if !good {
			continue
		}
		tm, T := x[0], x[1]+273.15
		switch {
		case tm < 0:
			fail(line, 1, nil, "time_s must not be negative, got %g", tm)
		case len(times) > 0 && !(tm > times[len(times)-1]):
			fail(line, 1, nil, "time_s must be strictly increasing: %g s does not come after %g s", tm, times[len(times)-1])
		case !(T > 0):
			_, col := r.FieldPos(1)
			fail(line, col, nil, "temperature_C %g is below absolute zero", x[1])
		default:
			times = append(times, tm)
			vals = append(vals, T)
		}
	}
	if n > MaxFileErrors {
		l.errs = append(l.errs, &Error{File: full, Key: key,
			Err: &detail{Kind: ErrFile, Msg: fmt.Sprintf("%d more errors in this file not shown", n-MaxFileErrors)}})
	}
	if n > 0 {
		return physics.Schedule{}, false
	}
	if len(times) == 0 {
		l.add(l.loc.Value(key), key, ErrFile, nil, fmt.Sprintf("the schedule file %s has no data rows", full))
		return physics.Schedule{}, false
	}
	s, err := physics.NewSchedule(times, vals)
	if err != nil { // not reached: checked above
		l.add(l.loc.Value(key), key, ErrFile, err, err.Error())
		return physics.Schedule{}, false
	}
	return s, true
}

// faceDef is a resolved [top] or [bottom].
type faceDef struct {
	face   physics.Face
	driver string  // the air or set temperature as written ("oven", "23 C"), "" if none
	end    float64 // end of the program the face uses, s (0 if none)
}

// face reads [top] or [bottom]; nil if absent or invalid.
func (l *loader) face(root *table, which string, scheds map[string]*physics.Schedule) *faceDef {
	if !root.has(which) {
		l.errs = append(l.errs, &Error{File: l.file, Key: which,
			Err:  &detail{Kind: ErrMissing, Msg: fmt.Sprintf("missing section [%s]: every face must be described, even an insulated one", which)},
			Hint: fmt.Sprintf("add, for example:\n[%s]\nkind = \"insulated\"", which)})
		return nil
	}
	raw, _ := root.m[which].(map[string]any)
	kind, _ := raw["kind"].(string)
	valid := allFaceKeys
	var note func(string) string
	if keys, ok := faceKeys[kind]; ok {
		valid, note = keys, faceKeyNote(kind)
	}
	t := l.open(which, root.m[which], valid, note)
	if t == nil {
		return nil
	}
	before := len(l.errs)
	if !l.require(t, "kind") {
		return nil
	}
	if _, ok := faceKeys[kind]; !ok {
		if s, isStr := l.str(t, "kind"); isStr {
			msg := fmt.Sprintf("unknown face kind %q", s)
			if g := Suggest(s, faceKinds); g != "" {
				msg += fmt.Sprintf("; did you mean %q?", g)
			}
			l.atValue(t.keyPath("kind"), ErrRange, "%s", msg).Hint = "the kinds are convection, fixed, flux and insulated"
		}
		return nil
	}
	f := &faceDef{}
	ok := true
	switch kind {
	case "insulated":
		f.face.Kind = physics.Insulated
	case "convection":
		ok = l.convectionFace(t, f, scheds)
	case "fixed":
		f.face.Kind = physics.Fixed
		l.require(t, "temperature")
		f.face.Set, f.driver, f.end, ok = l.driver(t, "temperature", scheds)
	case "flux":
		ok = l.fluxFace(t, f, scheds)
	}
	if !ok || len(l.errs) > before {
		return nil
	}
	return f
}

// faceKeyNote returns the note on a key that belongs to a face kind other
// than kind (a known one), listing the keys valid for kind.
func faceKeyNote(kind string) func(string) string {
	keys := faceKeys[kind]
	return func(k string) string {
		if !slices.Contains(allFaceKeys, k) {
			return ""
		}
		for _, other := range faceKinds {
			if slices.Contains(faceKeys[other], k) {
				a := "a"
				if kind == "insulated" {
					a = "an"
				}
				return fmt.Sprintf("%s %s face has no %s (it belongs to kind %q); valid keys here: %s", a, kind, k, other, strings.Join(keys, ", "))
			}
		}
		return ""
	}
}

// convectionFace reads the keys of a convection face t into f: h, the
// optional emissivity (in [0, 1]) and the air temperature. It returns false
// when the air temperature cannot be read.
func (l *loader) convectionFace(t *table, f *faceDef, scheds map[string]*physics.Schedule) bool {
	f.face.Kind = physics.Convection
	l.require(t, "h", "air")
	h, okH := l.quantity(t, "h", units.HeatTransferCoefficient)
	eps, okE := l.number(t, "emissivity")
	if okE && !(eps >= 0 && eps <= 1) {
		l.rangeErr(t.keyPath("emissivity"), eps, "emissivity must be in [0, 1]")
	}
	switch {
	case okH && !(h >= 0):
		l.rangeErr(t.keyPath("h"), t.m["h"], "h must not be negative")
	case okH && h == 0 && !(eps > 0):
		l.rangeErr(t.keyPath("h"), t.m["h"], "with h = 0 and no emissivity the face exchanges no heat").Hint =
			"say kind = \"insulated\" for a face that exchanges no heat"
	}
	f.face.H, f.face.Emissivity = h, eps
	var ok bool
	f.face.Air, f.driver, f.end, ok = l.driver(t, "air", scheds)
	return ok
}

// fluxFace reads the keys of a flux face t into f: the imposed flux (a
// constant or points in time) and the optional exchange with air beside it
// (h, emissivity, air). It returns false when the flux or the air
// temperature cannot be read.
func (l *loader) fluxFace(t *table, f *faceDef, scheds map[string]*physics.Schedule) bool {
	f.face.Kind = physics.Flux
	if l.require(t, "flux") {
		path := t.keyPath("flux")
		switch v := t.m["flux"].(type) {
		case []any:
			s, ok := l.points(path, v, units.HeatFlux)
			if !ok {
				return false
			}
			f.face.Flux, f.end = s, s.End()
		default:
			q, ok := l.quantityAt(path, v, units.HeatFlux)
			if !ok {
				return false
			}
			f.face.Flux = physics.Steady(q)
		}
	}
	// Optional exchange with air beside the imposed flux: a lamp over
	// a part that still loses heat by convection and radiation.
	h, okH := l.quantity(t, "h", units.HeatTransferCoefficient)
	eps, okE := l.number(t, "emissivity")
	switch {
	case okH && !(h >= 0):
		l.rangeErr(t.keyPath("h"), t.m["h"], "h must not be negative")
	case okE && !(eps >= 0 && eps <= 1):
		l.rangeErr(t.keyPath("emissivity"), eps, "emissivity must be in [0, 1]")
	case h > 0 || eps > 0:
		if n := len(l.errs); !l.require(t, "air") {
			if len(l.errs) > n {
				l.errs[len(l.errs)-1].Hint = "a flux face that also loses heat by convection or radiation needs the air temperature, for example: air = \"23 C\""
			}
			return false
		}
		f.face.H, f.face.Emissivity = h, eps
		sched, text, end, ok := l.driver(t, "air", scheds)
		if !ok {
			return false
		}
		f.face.Air, f.driver, f.end = sched, text, max(f.end, end)
	case t.has("air"):
		l.atValue(t.keyPath("air"), ErrRange, "air on a flux face needs h > 0 or emissivity > 0 (with neither, no heat is exchanged with it)").Hint =
			"add, for example, h = \"10 W/m^2/K\", or remove air"
	}
	return true
}

// driver reads a temperature that is either the name of a [schedules.X] or
// a constant ("23 C"). It returns the schedule, the text as written and the
// end of the schedule (0 for a constant).
func (l *loader) driver(t *table, key string, scheds map[string]*physics.Schedule) (physics.Schedule, string, float64, bool) {
	s, ok := l.str(t, key)
	if !ok {
		if t.has(key) {
			l.errs[len(l.errs)-1].Hint = fmt.Sprintf("%s is a schedule name or a constant temperature, for example: %s = \"oven\" or %s = \"23 C\"", key, key, key)
		}
		return physics.Schedule{}, "", 0, false
	}
	path := t.keyPath(key)
	if sc, named := scheds[s]; named {
		if sc == nil { // the schedule has errors of its own
			return physics.Schedule{}, s, 0, false
		}
		return *sc, s, sc.End(), true
	}
	if looksNumeric(s) {
		T, ok := l.quantityAt(path, s, units.Temperature)
		if !ok {
			return physics.Schedule{}, s, 0, false
		}
		return physics.Steady(T), s, 0, true
	}
	names := make([]string, 0, len(scheds))
	for n := range scheds {
		names = append(names, n)
	}
	sort.Strings(names)
	msg := fmt.Sprintf("unknown schedule %q", s)
	if g := Suggest(s, names); g != "" {
		msg += fmt.Sprintf("; did you mean %q?", g)
	} else if len(names) == 0 {
		msg += " (the case defines no [schedules])"
	} else {
		msg += fmt.Sprintf(" (the case defines %s)", quoteList(names))
	}
	l.atValue(path, ErrReference, "%s", msg).Hint =
		fmt.Sprintf("%s is the name of a [schedules.NAME] or a constant temperature like \"23 C\"", key)
	return physics.Schedule{}, s, 0, false
}

// looksNumeric reports whether s starts like a number (so it is a constant,
// not a schedule name).
func looksNumeric(s string) bool {
	s = strings.TrimSpace(s)
	s = strings.TrimPrefix(s, "−")
	return s != "" && strings.ContainsRune("0123456789+-.", rune(s[0]))
}
