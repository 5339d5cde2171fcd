package dscfile

import (
	"bytes"
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/testkit"
	"cureslab/physics"
	"cureslab/physics/dsc"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

const dscDir = "../../testdata/dsc"

// demoComment heads every generated scan file.
func demoComment(s dsc.Synth) string {
	prog := "isothermal at " + strconv.FormatFloat(s.Start-273.15, 'f', -1, 64) + " C"
	if s.Rate > 0 {
		prog = strings.TrimSuffix(strings.TrimSuffix(filepath.Base(s.Name), ".csv"), "Kmin") + " K/min"
		prog = strings.TrimPrefix(strings.TrimPrefix(prog, "dyn-"), "0")
	}
	return "SYNTHETIC DSC scan of dsc-demo-resin, an invented resin (not a product).\n" +
		"Made by cureslab's own generator (dsc.DemoScans, dsc.Synthesize) with 1 % noise\n" +
		"and a sloped instrument baseline; see README.md. Program: " + prog + "."
}

// TestDSCTestdata re-creates testdata/dsc from dsc.DemoScans and checks the
// files against it (to the last written digit, one unit of slack for
// rounding); go test ./cases -run TestDSCTestdata -update rewrites them.
func TestDSCTestdata(t *testing.T) {
	for _, spec := range dsc.DemoScans() {
		s, err := dsc.Synthesize(spec)
		if err != nil {
			t.Fatal(err)
		}
		var buf bytes.Buffer
		if err := writeScan(&buf, s, demoComment(spec)); err != nil {
			t.Fatal(err)
		}
		path := filepath.Join(dscDir, spec.Name)
		if testkit.Updating() {
			if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		got, err := ReadScan(context.Background(), path)
		if err != nil {
			t.Fatalf("%v (go test ./cases -run TestDSCTestdata -update re-creates it)", err)
		}
		want, err := parseScan(context.Background(), path, buf.Bytes())
		if err != nil {
			t.Fatal(err)
		}
		if len(got.Time) != len(want.Time) {
			t.Fatalf("%s: %d rows, the generator makes %d", path, len(got.Time), len(want.Time))
		}
		for i := range got.Time {
			if math.Abs(got.Time[i]-want.Time[i]) > 1.5e-3 || math.Abs(got.Temp[i]-want.Temp[i]) > 1.5e-4 ||
				math.Abs(got.HeatFlow[i]-want.HeatFlow[i]) > 1.5e-3 {
				t.Fatalf("%s row %d: (%g, %g, %g), the generator makes (%g, %g, %g)", path, i,
					got.Time[i], got.Temp[i], got.HeatFlow[i], want.Time[i], want.Temp[i], want.HeatFlow[i])
			}
		}
	}
}

func TestParseScanErrors(t *testing.T) {
	bad := filepath.Join(dscDir, "bad")
	for _, tc := range []struct {
		file string
		want string // in the message, with file:line:col
	}{
		{"non-monotonic-time.csv", "non-monotonic-time.csv:54:1: time_s: time must increase from row to row: 200 s does not come after 294 s"},
		{"missing-column.csv", "missing-column.csv:3:1: missing column heat_flow_W_per_g"},
		{"unknown-column.csv", `unknown-column.csv:3:3: unknown column "heat_flow_mW"`},
		{"non-numeric.csv", `non-numeric.csv:14:12: heat_flow_W_per_g: "n/a" is not a finite number`},
		{"too-few-rows.csv", "too-few-rows.csv:11: the scan has 8 data rows; at least 20 are needed"},
		{"no-header.csv", "no-header.csv:3:1: the first line must be the header time_s,temperature_C,heat_flow_W_per_g, not data"},
	} {
		_, err := ReadScan(context.Background(), filepath.Join(bad, tc.file))
		if err == nil || !strings.Contains(err.Error(), tc.want) || !errors.Is(err, ErrScan) {
			t.Errorf("%s: got %v\nwant it to contain %q and wrap ErrScan", tc.file, err, tc.want)
		}
	}
	if _, err := ReadScan(context.Background(), filepath.Join(bad, "absent.csv")); err == nil || !strings.Contains(err.Error(), "cannot read the scan") {
		t.Errorf("absent file: %v", err)
	}
	if _, err := parseScan(context.Background(), "empty.csv", nil); err == nil || !strings.Contains(err.Error(), "the file is empty") {
		t.Errorf("empty file: %v", err)
	}
	// Columns in another order, a BOM and blank-padded fields are fine.
	var b strings.Builder
	b.WriteString("\xef\xbb\xbfheat_flow_W_per_g, time_s, temperature_C\n")
	for i := range 30 {
		b.WriteString(strconv.Itoa(i) + "e-3, " + strconv.Itoa(i) + ", " + strconv.Itoa(20+i) + "\n")
	}
	s, err := parseScan(context.Background(), "reordered.csv", []byte(b.String()))
	if err != nil || len(s.Time) != 30 || s.Time[5] != 5 || math.Abs(s.Temp[5]-298.15) > 1e-12 || math.Abs(s.HeatFlow[5]-5) > 1e-12 {
		t.Errorf("reordered columns: %v, %+v", err, s)
	}
}

func TestWriteScanRoundTrip(t *testing.T) {
	specs := dsc.DemoScans()
	s, err := dsc.Synthesize(specs[2])
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := writeScan(&buf, s, "line one\nline two"); err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(buf.String(), "# line one\n# line two\ntime_s,temperature_C,heat_flow_W_per_g\n") {
		t.Errorf("header:\n%.200s", buf.String())
	}
	back, err := parseScan(context.Background(), "x.csv", buf.Bytes())
	if err != nil {
		t.Fatal(err)
	}
	for i := range s.Time {
		// The written precision: 1e-3 s, 1e-4 K, 1e-6 W/g.
		if math.Abs(back.Time[i]-s.Time[i]) > 5e-4 || math.Abs(back.Temp[i]-s.Temp[i]) > 5e-5+1e-12 ||
			math.Abs(back.HeatFlow[i]-s.HeatFlow[i]) > 5e-4 {
			t.Fatalf("row %d: %v %v %v vs %v %v %v", i, back.Time[i], back.Temp[i], back.HeatFlow[i], s.Time[i], s.Temp[i], s.HeatFlow[i])
		}
	}
}

// readDemo reads the example scans of testdata/dsc.
func readDemo(t *testing.T) []*dsc.Scan {
	t.Helper()
	var scans []*dsc.Scan
	for _, spec := range dsc.DemoScans() {
		s, err := ReadScan(context.Background(), filepath.Join(dscDir, spec.Name))
		if err != nil {
			t.Fatal(err)
		}
		scans = append(scans, s)
	}
	return scans
}

// TestCureBlockLoads fits the example scans, pastes the block into a case
// and checks that the case loads the fitted law to the block's four digits.
func TestCureBlockLoads(t *testing.T) {
	an, err := dsc.Analyze(readDemo(t), dsc.Options{Baseline: dsc.SigmoidalBaseline, Model: dsc.Autocatalytic, Diffusion: true})
	if err != nil || an.Fit == nil {
		t.Fatalf("%v %s", err, an.FitRefused)
	}
	block := cureBlock(an, "dsc-demo-resin")
	c, err := cases.Parse("block.toml", []byte(blockCase("dsc-demo-resin", block)), "")
	if err != nil {
		t.Fatalf("the fitted block does not load: %v\n%s", err, block)
	}
	got := c.Materials["dsc-demo-resin"].Cure
	want := an.Fit.Cure
	ga, wa := got.Model.(physics.Autocatalytic), want.Model.(physics.Autocatalytic)
	same := func(name string, g, w float64) {
		if math.Abs(g-w) > 5e-4*math.Abs(w) {
			t.Errorf("%s: the case has %.6g, the fit %.6g", name, g, w)
		}
	}
	same("A1", ga.A1, wa.A1)
	same("E1", ga.E1, wa.E1)
	same("A2", ga.A2, wa.A2)
	same("E2", ga.E2, wa.E2)
	same("m", ga.M, wa.M)
	same("n", ga.N, wa.N)
	same("total_heat", got.TotalHeat, an.TotalHeat)
	same("C", got.Diffusion.C, want.Diffusion.C)
	same("alpha_c0", got.Diffusion.Alpha0, want.Diffusion.Alpha0)
	same("alpha_cT", got.Diffusion.AlphaT, want.Diffusion.AlphaT)

	var out bytes.Buffer
	if err := PrintFit(&out, an, "dsc-demo-resin"); err != nil {
		t.Fatal(err)
	}
	for _, s := range []string{"Kissinger (ASTM E698", "Ozawa-Flynn-Wall (ASTM E1641)", "alpha  Friedman E kJ/mol",
		"  0.95  ", "alpha_cT", "R² = 0.99", "multi-step kinetics likely", "[materials.dsc-demo-resin.cure]"} {
		if !strings.Contains(out.String(), s) {
			t.Errorf("report lacks %q:\n%s", s, out.String())
		}
	}
}

func TestFormatNumbers(t *testing.T) {
	for _, tc := range []struct {
		got, want string
	}{
		{fmtExp(2.5341e7), "2.534e7"}, {fmtExp(6e5), "6e5"}, {fmtExp(1.5), "1.5"}, {fmtExp(3.2e-4), "3.2e-4"},
		{fmtSig(412.34, 4), "412.3"}, {fmtSig(5.9034e5, 4), "5.903e5"}, {fmtSig(math.NaN(), 3), "n/a"},
	} {
		if tc.got != tc.want {
			t.Errorf("got %q, want %q", tc.got, tc.want)
		}
	}
}

// FuzzParseScan: any input gives a scan or an error, never a panic, and a
// scan goes through dsc.Process and dsc.Analyze likewise.
func FuzzParseScan(f *testing.F) {
	entries, _ := os.ReadDir(filepath.Join(dscDir, "bad"))
	for _, e := range entries {
		b, _ := os.ReadFile(filepath.Join(dscDir, "bad", e.Name()))
		f.Add(b)
	}
	var small strings.Builder
	small.WriteString("time_s,temperature_C,heat_flow_W_per_g\n")
	for i := range 40 {
		small.WriteString(strconv.Itoa(i) + "," + strconv.Itoa(100+i) + "," + strconv.FormatFloat(math.Exp(-float64((i-20)*(i-20))/20), 'g', 6, 64) + "\n")
	}
	f.Add([]byte(small.String()))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := parseScan(context.Background(), "fuzz.csv", data)
		if err != nil {
			return
		}
		if _, err := dsc.Process(s, dsc.SigmoidalBaseline, dsc.Window{}); err != nil {
			return
		}
		dsc.Analyze([]*dsc.Scan{s, s}, dsc.Options{Model: dsc.NthOrder})
	})
}

// The isoconversional table printed by fit loads as a case and holds the
// table of the analysis (to the printed digits). (That such a table
// reproduces the scans it comes from is checked in physics/dsc.)
func TestIsoconversionalBlockLoads(t *testing.T) {
	an, err := dsc.Analyze(readDemo(t), dsc.Options{Baseline: dsc.SigmoidalBaseline, Model: dsc.Isoconversional})
	if err != nil || an.Fit == nil {
		t.Fatalf("%v %s", err, an.FitRefused)
	}
	block := cureBlock(an, "iso-resin")
	c, err := cases.Parse("block.toml", []byte(blockCase("iso-resin", block)), "")
	if err != nil {
		t.Fatalf("the printed table does not load: %v\n%s", err, block)
	}
	got := c.Materials["iso-resin"].Cure.Model.(*physics.Isoconversional)
	want := an.Fit.Cure.Model.(*physics.Isoconversional)
	ga, gE, gL := got.Table()
	wa, wE, wL := want.Table()
	if len(ga) != len(wa) {
		t.Fatalf("%d rows loaded, %d fitted", len(ga), len(wa))
	}
	for j := range ga {
		// Printed with 3 significant digits (alpha) and 5 (E, Af).
		if ga[j] != wa[j] || math.Abs(gE[j]/wE[j]-1) > 1e-4 || math.Abs(gL[j]-wL[j]) > 1e-4 {
			t.Errorf("row %d: loaded %g, %g, %g; fitted %g, %g, %g", j, ga[j], gE[j], gL[j], wa[j], wE[j], wL[j])
		}
	}
	var out bytes.Buffer
	if err := PrintFit(&out, an, "iso-resin"); err != nil {
		t.Fatal(err)
	}
	for _, s := range []string{"model-free (isoconversional) table", "alpha  E kJ/mol", `model = "isoconversional"`, "Af = ["} {
		if !strings.Contains(out.String(), s) {
			t.Errorf("report lacks %q:\n%s", s, out.String())
		}
	}
}

// blockCase is a minimal case around a printed cure block of material name.
func blockCase(name, block string) string {
	return `title = "block round trip"
[initial]
temperature = "23 C"
[[layer]]
name = "resin"
material = "` + name + `"
thickness = "5 mm"
[materials.` + name + `]
density = "1180 kg/m^3"
specific_heat = "1450 J/kg/K"
conductivity = "0.2 W/m/K"
[top]
kind = "insulated"
[bottom]
kind = "insulated"
[time]
end = "1 h"
` + block
}

// Ctrl-C stops the reading of a scan: before the file is read, and part-way
// through the rows (the context is checked every scanCheckRows rows). The
// error is the context's, not a complaint about the file.
func TestReadScanInterrupted(t *testing.T) {
	spec := dsc.DemoScans()[0]
	path := filepath.Join(dscDir, spec.Name)
	cancelled, cancel := context.WithCancel(context.Background())
	cancel()
	if s, err := ReadScan(cancelled, path); s != nil || !errors.Is(err, context.Canceled) {
		t.Errorf("ReadScan after Ctrl-C: %v", err)
	}
	// A scan of more rows than one stretch between two checks, read with
	// a context cancelled after its first check: the parse stops at the
	// second one.
	var b strings.Builder
	b.WriteString("time_s,temperature_C,heat_flow_W_per_g\n")
	for i := range 3 * scanCheckRows {
		b.WriteString(strconv.Itoa(i) + ",25,0.001\n")
	}
	ctx := testkit.NewStopAfter(1)
	if s, err := parseScan(ctx, "long.csv", []byte(b.String())); s != nil || !errors.Is(err, context.Canceled) || ctx.Checks() != 2 {
		t.Errorf("parse cancelled part-way: %v after %d checks, want 2", err, ctx.Checks())
	}
}
