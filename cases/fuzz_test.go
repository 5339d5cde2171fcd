package cases_test

// Fuzz targets for every reader of package cases. Each asserts properties
// that hold for any input, not just "no panic":
//
//	FuzzParseResolved   case file (TOML + units + validation) end to end
//	FuzzUnitsRoundTrip  units.Parse against formatting in SI and other units
//	FuzzScheduleCSV     the schedule-log CSV reader, through cases.Parse
//	FuzzScanCSV         the DSC scan reader of package dscfile, with a write round trip
//	FuzzCaseValues      the values of a valid case: ranges, and the solver behind them
//
// `go test` runs the seeds (the files below testdata/good, testdata/bad,
// cases/examples and cases/testdata/fuzz/<Target>/); long runs are
//
//	go test ./cases -run '^$' -fuzz '^FuzzParseResolved$' -fuzztime 10m
//
// (see testdata/fuzz/README.md for the record of the runs).

import (
	"bytes"
	"context"
	"cureslab/cases/tomltext"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"sort"
	"strconv"
	"strings"
	"testing"
	"time"

	"cureslab/cases"
	"cureslab/cases/check"
	"cureslab/cases/internal/testkit"
	"cureslab/cases/units"
	"cureslab/solver"
)

const (
	badDir  = "../testdata/bad"
	goodDir = "../testdata/good"
)

// fzSentinels are the kinds every *Error wraps exactly one of.
var fzSentinels = []error{cases.ErrSyntax, cases.ErrUnknownKey, cases.ErrType, cases.ErrUnit, cases.ErrRange, cases.ErrMissing,
	cases.ErrDuplicate, cases.ErrReference, cases.ErrFile}

// fzCheckErrors checks the contract of cases.Parse's errors: a non-empty
// cases.ErrorList of *Error, each wrapping exactly one sentinel, with a file, a
// message, and a line inside the file it names. A line of 0 (no position)
// is allowed only for a missing value or section (cases.ErrMissing) and for the
// "N more errors not shown" line that closes a long list for another file.
// name and data are the case file; other maps further files to their
// line counts.
func fzCheckErrors(t *testing.T, err error, name string, data []byte, other map[string]int) cases.ErrorList {
	t.Helper()
	var list cases.ErrorList
	if !errors.As(err, &list) || len(list) == 0 {
		t.Fatalf("error %T is not a non-empty ErrorList: %v", err, err)
	}
	for _, e := range list {
		if e == nil || e.Err == nil || e.File == "" {
			t.Fatalf("incomplete error %#v", e)
		}
		kinds := 0
		for _, s := range fzSentinels {
			if errors.Is(e, s) {
				kinds++
			}
		}
		if kinds != 1 {
			t.Errorf("error wraps %d sentinel kinds, want 1: %v", kinds, e)
		}
		if strings.TrimSpace(e.Err.Error()) == "" {
			t.Errorf("error without a message: %#v", e)
		}
		lines := testkit.LineCount(data)
		if e.File != name {
			n, ok := other[e.File]
			if !ok {
				t.Errorf("error in unexpected file %q: %v", e.File, e)
				continue
			}
			lines = n
		}
		switch {
		case e.Line < 0 || e.Col < 0:
			t.Errorf("negative position: %#v", e)
		case e.Line > lines:
			t.Errorf("line %d beyond the %d lines of %s: %v", e.Line, lines, e.File, e)
		case e.Line == 0 && !errors.Is(e, cases.ErrMissing) && !(e.File != name && strings.Contains(e.Err.Error(), "more errors")):
			t.Errorf("error without a position (only missing sections may have none): %v", e)
		}
	}
	return list
}

// fzCheckUnknownKeyLines checks that an unknown key that is a bare key is
// reported on a line of the case that spells it.
func fzCheckUnknownKeyLines(t *testing.T, list cases.ErrorList, data []byte) {
	t.Helper()
	lines := strings.Split(string(data), "\n")
	for _, e := range list {
		if !errors.Is(e, cases.ErrUnknownKey) || e.Line < 1 || e.Line > len(lines) {
			continue
		}
		k := e.Key[strings.LastIndexByte(e.Key, '.')+1:] // the last part of the key path
		bare := k != ""
		for i := 0; i < len(k); i++ {
			bare = bare && tomltext.IsBare(k[i])
		}
		if bare && strings.Contains(e.Key, k) && !strings.Contains(lines[e.Line-1], k) {
			t.Errorf("unknown key %q reported on line %d, which is %q", e.Key, e.Line, lines[e.Line-1])
		}
	}
}

// fzWalkFloats calls visit for every float64 reachable from v (through
// pointers, interfaces, structs, slices, arrays and maps, unexported fields
// included), with a path for messages. Map keys are visited in sorted order.
func fzWalkFloats(v reflect.Value, path string, visit func(path string, x float64)) {
	switch v.Kind() {
	case reflect.Pointer, reflect.Interface:
		if !v.IsNil() {
			fzWalkFloats(v.Elem(), path, visit)
		}
	case reflect.Struct:
		for i := 0; i < v.NumField(); i++ {
			fzWalkFloats(v.Field(i), path+"."+v.Type().Field(i).Name, visit)
		}
	case reflect.Slice, reflect.Array:
		for i := 0; i < v.Len(); i++ {
			fzWalkFloats(v.Index(i), fmt.Sprintf("%s[%d]", path, i), visit)
		}
	case reflect.Map:
		keys := v.MapKeys()
		sort.Slice(keys, func(i, j int) bool { return fmt.Sprint(keys[i]) < fmt.Sprint(keys[j]) })
		for _, k := range keys {
			fzWalkFloats(v.MapIndex(k), fmt.Sprintf("%s[%v]", path, k), visit)
		}
	case reflect.Float32, reflect.Float64:
		visit(path, v.Float())
	}
}

// fzSameModel reports whether a and b hold the same values, comparing floats
// by value with NaN equal to NaN (reflect.DeepEqual says NaN ≠ NaN), and
// returns the path of the first difference.
func fzSameModel(a, b reflect.Value, path string) (bool, string) {
	if a.Kind() != b.Kind() {
		return false, path + " (kind)"
	}
	switch a.Kind() {
	case reflect.Pointer, reflect.Interface:
		if a.IsNil() || b.IsNil() {
			return a.IsNil() == b.IsNil(), path + " (nil)"
		}
		if a.Kind() == reflect.Interface && a.Elem().Type() != b.Elem().Type() {
			return false, path + " (type)"
		}
		return fzSameModel(a.Elem(), b.Elem(), path)
	case reflect.Struct:
		for i := 0; i < a.NumField(); i++ {
			if ok, p := fzSameModel(a.Field(i), b.Field(i), path+"."+a.Type().Field(i).Name); !ok {
				return false, p
			}
		}
		return true, ""
	case reflect.Slice, reflect.Array:
		if a.Len() != b.Len() {
			return false, path + " (len)"
		}
		for i := 0; i < a.Len(); i++ {
			if ok, p := fzSameModel(a.Index(i), b.Index(i), fmt.Sprintf("%s[%d]", path, i)); !ok {
				return false, p
			}
		}
		return true, ""
	case reflect.Map:
		if a.Len() != b.Len() {
			return false, path + " (len)"
		}
		for _, k := range a.MapKeys() {
			bv := b.MapIndex(k)
			if !bv.IsValid() {
				return false, fmt.Sprintf("%s[%v] (missing)", path, k)
			}
			if ok, p := fzSameModel(a.MapIndex(k), bv, fmt.Sprintf("%s[%v]", path, k)); !ok {
				return false, p
			}
		}
		return true, ""
	case reflect.Float32, reflect.Float64:
		x, y := a.Float(), b.Float()
		return x == y || math.IsNaN(x) && math.IsNaN(y), path
	case reflect.Complex64, reflect.Complex128:
		return a.Complex() == b.Complex(), path
	case reflect.Bool:
		return a.Bool() == b.Bool(), path
	case reflect.String:
		return a.String() == b.String(), path
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64:
		return a.Int() == b.Int(), path
	case reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64, reflect.Uintptr:
		return a.Uint() == b.Uint(), path
	case reflect.Func, reflect.Chan, reflect.UnsafePointer:
		return a.IsNil() == b.IsNil(), path
	}
	return false, path + " (unhandled kind " + a.Kind().String() + ")"
}

// fzCheckResolved checks an accepted case: a mesh with cells whose widths add
// up to the stack, one valid material per layer, a positive finite end with
// output times that increase to it, probes inside the stack, and every
// resolved number finite (except the criteria, whose NaN means "not set").
func fzCheckResolved(t *testing.T, c *cases.Case) {
	t.Helper()
	p := c.Problem
	if p == nil || p.Mesh == nil || p.Mesh.Cells() == 0 {
		t.Fatalf("accepted case without a mesh: %+v", c)
	}
	m := p.Mesh
	n := m.Cells()
	if len(p.Materials) != len(m.Layers) || len(c.Layers) != len(m.Layers) || len(m.First) != len(m.Layers)+1 {
		t.Fatalf("%d materials, %d layer infos, %d first cells for %d layers", len(p.Materials), len(c.Layers), len(m.First), len(m.Layers))
	}
	if len(m.Faces) != n+1 || len(m.Centers) != n || len(m.Owner) != n || m.First[0] != 0 || m.First[len(m.Layers)] != n {
		t.Fatalf("inconsistent mesh: %d cells, %d faces, %d centres, %d owners, first %v", n, len(m.Faces), len(m.Centers), len(m.Owner), m.First)
	}
	total := 0.0
	for j, L := range m.Layers {
		if !(L.Thickness > 0) || m.First[j+1] <= m.First[j] {
			t.Errorf("layer %d: thickness %g m, cells %d..%d", j, L.Thickness, m.First[j], m.First[j+1])
		}
		total += L.Thickness
		mat := p.Materials[j]
		if mat == nil || !(mat.Density > 0) || !(mat.SpecificHeat.Min() > 0) || !(mat.Conductivity.Min() > 0) {
			t.Errorf("layer %d: material %+v is not usable", j, mat)
		}
		if mat != nil && mat.Cure != nil {
			cu := mat.Cure
			if cu.Model == nil || !(cu.TotalHeat >= 0) || !(cu.ResinFraction > 0 && cu.ResinFraction <= 1) || !(cu.GelPoint > 0 && cu.GelPoint < 1) {
				t.Errorf("layer %d: cure %+v out of range", j, cu)
			}
		}
	}
	for i := 0; i < n; i++ {
		if !(m.Widths[i] > 0) || !(m.Faces[i+1] > m.Faces[i]) || m.Owner[i] < 0 || m.Owner[i] >= len(m.Layers) {
			t.Fatalf("cell %d: width %g, faces %g..%g, owner %d", i, m.Widths[i], m.Faces[i], m.Faces[i+1], m.Owner[i])
		}
	}
	if th := m.Thickness(); math.Abs(th-total) > 1e-12*total {
		t.Errorf("mesh thickness %g m, layers add up to %g m", th, total)
	}
	if !(p.End > 0) || math.IsInf(p.End, 0) {
		t.Errorf("end %g s", p.End)
	}
	if len(p.OutputTimes) == 0 || p.OutputTimes[len(p.OutputTimes)-1] != p.End {
		t.Errorf("output times %v do not end at End %g", p.OutputTimes, p.End)
	}
	for i, tm := range p.OutputTimes {
		if !(tm > 0) || i > 0 && !(tm > p.OutputTimes[i-1]) {
			t.Fatalf("output time %d = %g s (previous %v)", i, tm, p.OutputTimes[max(i-1, 0)])
		}
	}
	if !(p.InitialTemperature > 0) || !(p.InitialCure >= 0 && p.InitialCure < 1) {
		t.Errorf("initial state %g K, cure %g", p.InitialTemperature, p.InitialCure)
	}
	if !(p.AbortTemperature > p.InitialTemperature) {
		t.Errorf("abort temperature %g K is not above the initial temperature %g K: the run would stop at its first step", p.AbortTemperature, p.InitialTemperature)
	}
	if !(p.MaxStep >= 0) || !(p.TemperatureTolerance >= 0) || !(p.CureTolerance >= 0 && p.CureTolerance < 1) {
		t.Errorf("step settings %g s, %g K, %g", p.MaxStep, p.TemperatureTolerance, p.CureTolerance)
	}
	for _, z := range p.Probes {
		if !(z >= 0 && z <= m.Thickness()) {
			t.Errorf("probe at %g m outside the stack (0 to %g m)", z, m.Thickness())
		}
	}
	fzWalkFloats(reflect.ValueOf(c), "Case", func(path string, x float64) {
		if math.IsInf(x, 0) || math.IsNaN(x) && !strings.HasPrefix(path, "Case.Criteria.") {
			t.Errorf("%s = %g in an accepted case", path, x)
		}
	})
}

// fzShortRun runs the accepted case for a few milliseconds of wall time:
// the solver must accept the problem (no ErrProblem for a case the loader
// accepted), must not panic, and every snapshot must hold finite
// temperatures and cures in [0, 1] (NaN only in cells that do not cure).
func fzShortRun(t *testing.T, c *cases.Case, budget time.Duration) {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), budget)
	defer cancel()
	r, err := solver.Run(ctx, c.Problem)
	if err != nil {
		t.Fatalf("the solver refuses a case the loader accepted: %v", err)
	}
	if len(r.Snapshots) == 0 {
		t.Fatalf("no snapshot (status %v, %v)", r.Status, r.Err)
	}
	fzCheckSnapshots(t, c, r)
}

// fzCheckSnapshots checks every snapshot of r for values no output file may
// hold: non-finite temperatures, cure outside [0, 1] in curing cells, a
// cure value in a cell that does not cure.
func fzCheckSnapshots(t testing.TB, c *cases.Case, r *solver.Result) {
	t.Helper()
	m := c.Problem.Mesh
	anyCuring := false
	for _, mt := range c.Problem.Materials {
		anyCuring = anyCuring || mt.Cure != nil
	}
	for _, s := range r.Snapshots {
		if !anyCuring && (s.Cure != nil || s.Rate != nil || s.Tg != nil) {
			t.Fatalf("t = %g s: cure fields in a stack that does not cure", s.Time)
		}
		for i, T := range s.T {
			if math.IsNaN(T) || math.IsInf(T, 0) || T <= 0 {
				t.Fatalf("t = %g s, cell %d: T = %g K (status %v, %v)", s.Time, i, T, r.Status, r.Err)
			}
			curing := c.Problem.Materials[m.Owner[i]].Cure != nil
			a := math.NaN()
			if anyCuring {
				a = s.Cure[i]
			}
			if curing && !(a >= 0 && a <= 1) || !curing && !math.IsNaN(a) {
				t.Fatalf("t = %g s, cell %d: cure %g (curing layer: %v)", s.Time, i, a, curing)
			}
		}
		for k, T := range s.ProbeT {
			if math.IsNaN(T) || math.IsInf(T, 0) {
				t.Fatalf("t = %g s, probe %d: T = %g K", s.Time, k, T)
			}
		}
	}
}

// FuzzParseResolved feeds any bytes to cases.Parse as a case file. Properties:
//   - no panic;
//   - a rejection is an cases.ErrorList of positioned *Error (fzCheckErrors), and
//     an unknown bare key is reported on a line that spells it;
//   - an accepted case is complete and consistent (fzCheckResolved);
//   - parsing is deterministic: the same bytes give the same resolved model
//     (compared field by field, NaN = NaN) and the same `check` text, and
//     Check writes without error;
//   - the solver accepts the problem and a short run keeps every
//     temperature finite and every cure in [0, 1].
func FuzzParseResolved(f *testing.F) {
	testkit.SeedFiles(f, filepath.Join(goodDir, "*.toml"), filepath.Join(badDir, "*.toml"), "examples/*.toml")
	f.Fuzz(func(t *testing.T, data []byte) {
		defer testkit.Watchdog(testkit.HangLimit, data)()
		c, err := cases.Parse("fuzz.toml", data, goodDir)
		if err != nil {
			other := map[string]int{}
			for _, name := range []string{"oven-log.csv", "bad-log.csv", "bad-header.csv"} {
				if b, rerr := os.ReadFile(filepath.Join(goodDir, name)); rerr == nil {
					other[filepath.Join(goodDir, name)] = testkit.LineCount(b)
				}
			}
			list := fzCheckErrors(t, err, "fuzz.toml", data, other)
			fzCheckUnknownKeyLines(t, list, data)
			// Determinism of the rejection, too.
			_, err2 := cases.Parse("fuzz.toml", data, goodDir)
			if err2 == nil || err2.Error() != err.Error() {
				t.Fatalf("second parse gives a different result:\n%v\n---\n%v", err, err2)
			}
			return
		}
		fzCheckResolved(t, c)
		c2, err := cases.Parse("fuzz.toml", data, goodDir)
		if err != nil {
			t.Fatalf("second parse fails: %v", err)
		}
		if ok, where := fzSameModel(reflect.ValueOf(c), reflect.ValueOf(c2), "Case"); !ok {
			t.Fatalf("second parse resolves a different model at %s", where)
		}
		var b1, b2 bytes.Buffer
		if err := check.Check(&b1, c); err != nil {
			t.Fatalf("Check: %v", err)
		}
		if err := check.Check(&b2, c2); err != nil || b1.String() != b2.String() {
			t.Fatalf("check text differs between two parses of the same bytes (err %v)", err)
		}
		fzShortRun(t, c, 20*time.Millisecond)
	})
}

// fzUnitAlternatives gives, per dimension, a non-SI unit and its size in SI,
// for the second round trip of FuzzUnitsRoundTrip (temperatures in C are
// handled apart: they are offset, not scaled).
var fzUnitAlternatives = map[units.Dim]struct {
	unit  string
	scale float64
}{
	// Source: SI prefixes and the minute/hour (NIST SP 811 (2008), §4 and
	// Table 6, from memory); the kilojoule and kilowatt likewise.
	units.Length:                  {"mm", 1e-3},
	units.Time:                    {"min", 60},
	units.TemperatureDifference:   {"C", 1},
	units.HeatingRate:             {"C/min", 1.0 / 60},
	units.Density:                 {"g/m^3", 1e-3},
	units.SpecificHeat:            {"kJ/kg/K", 1e3},
	units.Conductivity:            {"mW/m/K", 1e-3},
	units.HeatTransferCoefficient: {"kW/m^2/K", 1e3},
	units.ContactResistance:       {"mm^2*K/W", 1e-6},
	units.EnergyPerMass:           {"J/g", 1e3},
	units.EnergyPerMole:           {"kJ/mol", 1e3},
	units.RateConstant:            {"1/min", 1.0 / 60},
	units.Frequency:               {"MHz", 1e6},
	units.ElectricField:           {"kV/m", 1e3},
	units.HeatFlux:                {"kW/m^2", 1e3},
	units.Power:                   {"kW", 1e3},
	units.InverseTemperature:      {"1/C", 1},
	units.PowerDensity:            {"kW/m^3", 1e3},
	units.Viscosity:               {"mPa*s", 1e-3},
}

// FuzzUnitsRoundTrip feeds any string and dimension to units.Parse.
// Properties: no panic; a rejection is a *units.Error that quotes the input
// and has a one-line message; an accepted value is finite (and an absolute
// temperature is above 0 K); formatting the value as the shortest decimal
// in the SI unit of the dimension and parsing it again gives the same value
// bit for bit; formatting it in another unit of the same dimension gives it
// back to a few ulps.
func FuzzUnitsRoundTrip(f *testing.F) {
	seeds := []string{"12 mm", "25 C", "2 C/min", "15 W/m^2/K", "420 J/g", "65 kJ/mol", "1.2e5 1/s",
		"1 in", "2 mil", "3 µm", "90 min", "1.5 h", "77 F", "300 K", "-40 °F", "10 degC", "1 lb",
		"2 kcal", "2.45 GHz", "1.5 kV/m", "3 V/cm", "2e-4 m^2*K/W", "0.19 W/(m*K)", "1150 kg/m3",
		"−5 C", "1e308 m", "5e-324 m", "0x1p-3 m", "1_000 m", "12mm", "12 MM", "12 m m", "W/m.K",
		"1 m2K/W", "-273.15 C", "-273.16 C", "0.0052 1/K", "50 kW/m^3", "100 W", "4 cal/g"}
	for i, s := range seeds {
		f.Add(s, i)
	}
	f.Fuzz(func(t *testing.T, s string, di int) {
		defer testkit.Watchdog(testkit.HangLimit, []byte(s))()
		n := int(units.Viscosity)
		d := units.Dim(1 + ((di%n)+n)%n)
		x, err := units.Parse(s, d)
		if err != nil {
			var ue *units.Error
			if !errors.As(err, &ue) {
				t.Fatalf("Parse(%q, %v): error %T is not *units.Error", s, d, err)
			}
			if ue.Input != s || ue.Dim != d || ue.Msg == "" || strings.ContainsAny(ue.Msg, "\r\n") {
				t.Fatalf("Parse(%q, %v): error %#v does not quote the input in one line", s, d, ue)
			}
			return
		}
		if math.IsNaN(x) || math.IsInf(x, 0) {
			t.Fatalf("Parse(%q, %v) = %g with no error", s, d, x)
		}
		if d == units.Temperature && !(x >= 0) {
			t.Fatalf("Parse(%q, temperature) = %g K, below absolute zero", s, x)
		}
		si := strconv.FormatFloat(x, 'g', -1, 64) + " " + d.SIUnit()
		y, err := units.Parse(si, d)
		if err != nil || y != x {
			t.Fatalf("Parse(%q, %v) = %v, but Parse(%q) = %v, %v", s, d, x, si, y, err)
		}
		var alt string
		if d == units.Temperature {
			// Source: NIST SP 811 (2008), §4.2.1.1: t/°C = T/K − 273.15 (from memory).
			alt = strconv.FormatFloat(x-273.15, 'g', -1, 64) + " C"
		} else {
			a := fzUnitAlternatives[d]
			v := x / a.scale
			if math.IsInf(v, 0) || v != 0 && math.Abs(v) < 1e-290 || x != 0 && math.Abs(x) < 1e-290 {
				return // beyond the float range in the other unit
			}
			alt = strconv.FormatFloat(v, 'g', -1, 64) + " " + a.unit
		}
		z, err := units.Parse(alt, d)
		if err != nil {
			t.Fatalf("Parse(%q, %v) = %v, but the same value written %q fails: %v", s, d, x, alt, err)
		}
		// Two roundings (division, multiplication) of at most ½ ulp each,
		// plus the decimal conversion; for C the offset 273.15 costs up to
		// an ulp of the larger of x and 273.15.
		tol := 4 * math.Abs(x) * 0x1p-52
		if d == units.Temperature {
			tol = 4 * max(math.Abs(x), 273.15) * 0x1p-52
		}
		if math.Abs(z-x) > tol {
			t.Fatalf("Parse(%q, %v) = %v, but %q gives %v (difference %g)", s, d, x, alt, z, z-x)
		}
	})
}

// fzScheduleCase is a case whose faces follow the log in log.csv; time.end
// is given so that every error comes from the log.
const fzScheduleCase = `[initial]
temperature = "23 C"

[time]
end = "1 h"

[[layer]]
name = "slab"
material = "aluminium"
thickness = "2 mm"

[schedules.log]
file = "log.csv"

[top]
kind = "convection"
h = "10 W/m^2/K"
air = "log"

[bottom]
kind = "insulated"
`

// fzLogOracle reads a schedule log independently of encoding/csv, for the
// simple texts it understands: no quotes, no carriage return except before
// a newline, no blank-looking lines that are not empty. simple is false for
// any other text. Otherwise it returns the points (times in s, temperatures
// in K) or the 1-based line of the first problem.
func fzLogOracle(data []byte) (times, temps []float64, badLine int, simple bool) {
	text := strings.TrimPrefix(string(data), "\xef\xbb\xbf")
	if strings.ContainsAny(text, "\"") {
		return nil, nil, 0, false
	}
	lines := strings.Split(text, "\n")
	for i := range lines {
		lines[i] = strings.TrimSuffix(lines[i], "\r")
		if strings.Contains(lines[i], "\r") {
			return nil, nil, 0, false
		}
		if lines[i] != "" && strings.TrimSpace(lines[i]) == "" {
			return nil, nil, 0, false
		}
	}
	header := true
	for i, ln := range lines {
		if ln == "" || ln[0] == '#' {
			continue
		}
		fields := strings.Split(ln, ",")
		if header {
			if len(fields) != 2 || strings.TrimSpace(fields[0]) != "time_s" || strings.TrimSpace(fields[1]) != "temperature_C" {
				return nil, nil, i + 1, true
			}
			header = false
			continue
		}
		if len(fields) != 2 {
			return nil, nil, i + 1, true
		}
		var x [2]float64
		for k, fld := range fields {
			v, err := strconv.ParseFloat(strings.TrimSpace(fld), 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, nil, i + 1, true
			}
			x[k] = v
		}
		// Source: NIST SP 811 (2008), §4.2.1.1: T/K = t/°C + 273.15 (from memory).
		T := x[1] + 273.15
		if x[0] < 0 || len(times) > 0 && !(x[0] > times[len(times)-1]) || !(T > 0) {
			return nil, nil, i + 1, true
		}
		times, temps = append(times, x[0]), append(temps, T)
	}
	if header || len(times) == 0 {
		return nil, nil, 0, true // no data: reported at the case's file key
	}
	return times, temps, 0, true
}

// FuzzScheduleCSV writes any bytes as the oven log of a case and parses the
// case. Properties: no panic; every rejection is positioned — errors in
// the log name the log file and a line of it (≥ 1), and the only error in
// the case file is the one at schedules.log.file for a log without data;
// for the texts the independent fzLogOracle understands, the loader accepts
// exactly when the oracle does, reports its first problem on the same line,
// and returns the same points.
func FuzzScheduleCSV(f *testing.F) {
	for _, s := range []string{
		"time_s,temperature_C\n0,22\n600,60.5\n1800,120\n3600,120\n",
		"\xef\xbb\xbftime_s,temperature_C\r\n0,22\r\n60,30\r\n",
		"# logged by oven 3\ntime_s, temperature_C\n0, 22\n\n60, 30\n",
		"time_s,temperature_C\n0,23\n600,60\n1200,hot\n1800,100\n",
		"time,temp\n0,23\n",
		"time_s,temperature_C\n",
		"time_s,temperature_C\n0,\"2\n3\"\n",
		"time_s,temperature_C\n0,-300\n",
		"time_s,temperature_C\n10,20\n5,30\n",
		"time_s,temperature_C\n0,20,1\n",
		"time_s,temperature_C\n0,NaN\n1,Inf\n",
		"",
	} {
		f.Add([]byte(s))
	}
	testkit.SeedFiles(f, filepath.Join(goodDir, "*.csv"), filepath.Join(badDir, "*.csv"))
	f.Fuzz(func(t *testing.T, data []byte) {
		defer testkit.Watchdog(testkit.HangLimit, data)()
		dir := t.TempDir()
		log := filepath.Join(dir, "log.csv")
		if err := os.WriteFile(log, data, 0o644); err != nil {
			t.Fatal(err)
		}
		c, err := cases.Parse("case.toml", []byte(fzScheduleCase), dir)
		times, temps, bad, simple := fzLogOracle(data)
		if err != nil {
			list := fzCheckErrors(t, err, "case.toml", []byte(fzScheduleCase), map[string]int{log: testkit.LineCount(data)})
			first := 0
			for _, e := range list {
				if e.Key != "schedules.log.file" {
					t.Errorf("error not about the log: %v", e)
				}
				if e.File == log && e.Line < 1 && !strings.Contains(e.Err.Error(), "more errors") {
					t.Errorf("error in the log without a line: %v", e)
				}
				if e.File == log && first == 0 {
					first = e.Line
				}
			}
			if simple && bad == 0 && times != nil {
				t.Fatalf("loader rejects a log the oracle reads as %v / %v: %v", times, temps, err)
			}
			if simple && bad > 0 && first != bad {
				t.Fatalf("first error on line %d, oracle says line %d: %v", first, bad, err)
			}
			return
		}
		s, ok := c.Schedules["log"]
		if !ok {
			t.Fatal("accepted case without its schedule")
		}
		gt, gv := s.Points()
		for i := range gt {
			if !(gt[i] >= 0) || i > 0 && !(gt[i] > gt[i-1]) || !(gv[i] > 0) || math.IsInf(gt[i], 0) || math.IsInf(gv[i], 0) {
				t.Fatalf("accepted log point %d: %g s, %g K", i, gt[i], gv[i])
			}
		}
		if simple {
			if bad > 0 || times == nil {
				t.Fatalf("loader accepts a log the oracle rejects on line %d", bad)
			}
			if !reflect.DeepEqual(gt, times) || !reflect.DeepEqual(gv, temps) {
				t.Fatalf("points %v / %v, oracle %v / %v", gt, gv, times, temps)
			}
		}
	})
}

// fzValuesCase is a valid two-layer case (a curing resin on a plate, oven
// above, platen below) whose numbers FuzzCaseValues replaces; the units
// stay, so that almost every input is well formed.
const fzValuesCase = `[initial]
temperature = "%v C"
cure = %v

[time]
end = "%v s"

[[layer]]
name = "resin"
material = "fz-resin"
thickness = "%v mm"

[[layer]]
name = "plate"
material = "aluminium"
thickness = "%v mm"
contact_resistance = "%v m^2*K/W"

[materials.fz-resin]
density = "1150 kg/m^3"
specific_heat = "1500 J/kg/K"
conductivity = "%v W/m/K"

[materials.fz-resin.cure]
model = "autocatalytic"
total_heat = "%v J/g"
A1 = "%v 1/s"
E1 = "%v kJ/mol"
A2 = "6e5 1/s"
E2 = "58 kJ/mol"
m = 0.45
n = %v

[schedules.oven]
start = "23 C"
segments = [{ ramp = "%v C/min", to = "150 C" }, { hold = "30 min" }]

[top]
kind = "convection"
h = "%v W/m^2/K"
air = "oven"

[bottom]
kind = "fixed"
temperature = "%v C"

[output]
probes = ["%v mm"]
`

// FuzzCaseValues fuzzes the numbers, not the structure, of a valid case:
// each of the 15 numbers of fzValuesCase (temperatures, times, thicknesses,
// conductivity, contact resistance, kinetics, ramp, h, probe depth) is a
// fuzzed float64 written with its unit, so that almost every input reaches
// the range checks and every accepted one the solver. Properties as
// FuzzParseResolved: a rejection is positioned; an accepted case is
// consistent and deterministic, passes Check, and a 20 ms run keeps every
// value finite.
func FuzzCaseValues(f *testing.F) {
	f.Add(23.0, 0.0, 10800.0, 4.0, 2.0, 2e-4, 0.2, 400.0, 2e4, 62.0, 1.6, 2.0, 20.0, 23.0, 4.0)
	f.Add(23.0, 0.999, 5.0, 0.001, 50.0, 1.0, 0.004, 420.0, 3.3e9, 50.0, 0.0, 1000.0, 1e6, 180.0, 0.001)
	f.Add(126.85, 0.5, 360000.0, 10.0, 0.1, 0.0, 401.0, 0.0, 1e-30, 0.0, 3.0, 0.01, 1e-3, -273.0, 10.1)
	f.Fuzz(func(t *testing.T, T0, cure, end, th1, th2, rc, k, heat, A1, E1, n, ramp, h, Tbot, probe float64) {
		data := []byte(fmt.Sprintf(fzValuesCase, T0, cure, end, th1, th2, rc, k, heat, A1, E1, n, ramp, h, Tbot, probe))
		defer testkit.Watchdog(testkit.HangLimit, data)()
		c, err := cases.Parse("values.toml", data, "")
		if err != nil {
			list := fzCheckErrors(t, err, "values.toml", data, nil)
			fzCheckUnknownKeyLines(t, list, data)
			return
		}
		fzCheckResolved(t, c)
		c2, err := cases.Parse("values.toml", data, "")
		if err != nil {
			t.Fatalf("second parse fails: %v", err)
		}
		if ok, where := fzSameModel(reflect.ValueOf(c), reflect.ValueOf(c2), "Case"); !ok {
			t.Fatalf("second parse resolves a different model at %s", where)
		}
		if err := check.Check(io.Discard, c); err != nil {
			t.Fatalf("Check: %v", err)
		}
		fzShortRun(t, c, 20*time.Millisecond)
	})
}
