package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// dscFiles returns the absolute paths of the example scans of testdata/dsc
// (before a test changes directory).
func dscFiles(t *testing.T, names ...string) []string {
	t.Helper()
	dir, err := filepath.Abs(filepath.Join("..", "..", "testdata", "dsc"))
	if err != nil {
		t.Fatal(err)
	}
	if len(names) == 0 {
		names = []string{"dyn-02Kmin.csv", "dyn-05Kmin.csv", "dyn-10Kmin.csv", "dyn-20Kmin.csv",
			"iso-100C.csv", "iso-115C.csv", "iso-130C.csv"}
	}
	var out []string
	for _, n := range names {
		out = append(out, filepath.Join(dir, n))
	}
	return out
}

// partCase is a 10 mm casting of the resin fitted from the example scans;
// the fitted block is appended to it, as a user pastes it.
const partCase = `title = "10 mm casting of dsc-demo-resin, oven cure"

[initial]
temperature = "23 C"

[[layer]]
name = "casting"
material = "dsc-demo-resin"
thickness = "10 mm"

[[layer]]
name = "mould"
material = "aluminium"
thickness = "3 mm"

[materials.dsc-demo-resin]
density = "1180 kg/m^3"
specific_heat = "1450 J/kg/K"
conductivity = "0.20 W/m/K"

[schedules.oven]
start = "23 C"
segments = [
  { ramp = "1 C/min", to = "60 C" },
  { hold = "6 h" },
  { ramp = "0.2 C/min", to = "140 C" },
  { hold = "1 h" },
]

[top]
kind = "convection"
h = "10 W/m^2/K"
air = "oven"

[bottom]
kind = "convection"
h = "15 W/m^2/K"
air = "oven"

[criteria]
min_cure = 0.9
max_temperature = "180 C"

# Paste the block printed by 'cureslab fit' below this line.
`

// TestFitThenRun is the README workflow: fit the example scans, paste the
// block into a case, run it.
func TestFitThenRun(t *testing.T) {
	files := dscFiles(t)
	chdir(t)
	args := append([]string{"fit"}, files...)
	args = append(args, "--diffusion", "--baseline", "sigmoidal", "--name", "dsc-demo-resin", "-o", "resin.toml")
	code, out, errs := cl(t, args...)
	if code != 0 {
		t.Fatalf("fit: exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	for _, s := range []string{"Kissinger (ASTM E698", "Ozawa-Flynn-Wall", "Friedman", "Levenberg-Marquardt",
		"[materials.dsc-demo-resin.cure]", "[materials.dsc-demo-resin.cure.diffusion]", "block written to resin.toml"} {
		if !strings.Contains(out, s) {
			t.Errorf("fit output lacks %q:\n%s", s, out)
		}
	}
	block, err := os.ReadFile("resin.toml")
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(out, string(block)) {
		t.Errorf("the written block is not the printed one:\n%s", block)
	}
	if err := os.WriteFile("part.toml", append([]byte(partCase), block...), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs = cl(t, "run", "part.toml", "-o", "part-out")
	if code != 0 {
		t.Fatalf("run: exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	s := readSummary(t, "part-out")
	// The slow post-cure keeps the exotherm below 180 C and cures the part
	// through (min_cure 0.9 passes, exit 0).
	if s.Status != "ok" {
		t.Errorf("status %q\n%s", s.Status, out)
	}
	// ttt on the same case: the fitted resin has no glass transition, so
	// the vitrification column is empty.
	code, out, errs = cl(t, "ttt", "part.toml", "--material", "dsc-demo-resin")
	if code != 0 || !strings.Contains(out, "no glass_transition") || !strings.Contains(out, "table written to ./part-ttt.csv") {
		t.Errorf("ttt: exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	csv, _ := os.ReadFile("part-ttt.csv")
	if !strings.HasPrefix(string(csv), "temperature_C,gel_time_s,vitrification_time_s,time_to_0.9_s\n") {
		t.Errorf("part-ttt.csv:\n%s", csv)
	}
}

func TestFitBadScans(t *testing.T) {
	good := dscFiles(t, "dyn-05Kmin.csv", "dyn-10Kmin.csv")
	bad := func(name string) string { return dscFiles(t, filepath.Join("bad", name))[0] }
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{bad("non-monotonic-time.csv"), good[0]}, "non-monotonic-time.csv:54:1: time_s: time must increase"},
		{[]string{bad("missing-column.csv"), good[0]}, "missing-column.csv:3:1: missing column heat_flow_W_per_g"},
		{[]string{bad("non-numeric.csv")}, `non-numeric.csv:14:12: heat_flow_W_per_g: "n/a" is not a finite number`},
		{[]string{bad("ramp-and-hold.csv"), good[0]}, "neither a constant heating rate nor isothermal"},
		{[]string{good[0], "--model", "autocat"}, `unknown model "autocat"; did you mean "autocatalytic"?`},
		{[]string{good[0], "--baseline", "cubic"}, `unknown baseline "cubic"`},
		{[]string{good[0], "--onset", "60"}, "--onset"},
		{[]string{good[0], "--name", "my resin"}, "a material name is letters, digits"},
		{[]string{good[0], "--onset", "100 C", "--end", "50 C"}, "--end must be above --onset"},
		{[]string{}, "expects one or more scan files"},
		// Two dynamic scans and no isotherm: --diffusion cannot be fitted.
		{append(append([]string{}, good...), "--diffusion"), "no model fitted: the diffusion factor needs isothermal scans"},
	} {
		chdir(t)
		code, out, errs := cl(t, append([]string{"fit"}, tc.args...)...)
		if code != 2 || !strings.Contains(errs, tc.want) {
			t.Errorf("fit %q: exit %d, stderr:\n%s\nwant exit 2 and %q\nstdout:\n%s", tc.args, code, errs, tc.want, out)
		}
	}
}

// TestFitSingleRate: one heating rate refuses a model (exit 2) but still
// reports the scan and its heat, and writes no block.
func TestFitSingleRate(t *testing.T) {
	one := dscFiles(t, "dyn-10Kmin.csv")[0]
	chdir(t)
	code, out, errs := cl(t, "fit", one, "-o", "block.toml")
	if code != 2 || !strings.Contains(errs, "no model fitted: a single temperature program") ||
		!strings.Contains(out, "dyn-10Kmin.csv  10 K/min") || !strings.Contains(out, "only 1 temperature program") {
		t.Errorf("exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	if _, err := os.Stat("block.toml"); !os.IsNotExist(err) {
		t.Errorf("a refused fit wrote its block: %v", err)
	}
}

// TestFitNthOrderWarnings: three close heating rates fitted with the n-th
// order law: the ICTAC span warning and a poor-fit warning for an
// autocatalytic resin.
func TestFitNthOrderWarnings(t *testing.T) {
	files := dscFiles(t, "dyn-02Kmin.csv", "dyn-05Kmin.csv", "dyn-10Kmin.csv")
	chdir(t)
	code, out, errs := cl(t, append([]string{"fit", "--model", "nth-order"}, files...)...)
	if code != 0 || !strings.Contains(out, "span a factor 5 only") || !strings.Contains(out, `model = "nth-order"`) ||
		!strings.Contains(out, "try the autocatalytic model") {
		t.Errorf("exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
}

func TestTTTCommand(t *testing.T) {
	chdir(t)
	writeExample(t, "thick-potting-oven", "potting.toml")
	code, out, errs := cl(t, "ttt", "potting.toml", "--material", "potting-resin-A", "--from", "40 C", "--to", "140 C",
		"--step", "20 K", "--cure", "0.9", "-o", "t.csv")
	if code != 0 || !strings.Contains(out, "to cure 0.9") || !strings.Contains(out, "table written to t.csv") {
		t.Fatalf("exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	b, err := os.ReadFile("t.csv")
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(b)), "\n")
	if len(lines) != 7 || lines[0] != "temperature_C,gel_time_s,vitrification_time_s,time_to_0.9_s" || !strings.HasPrefix(lines[6], "140,") {
		t.Errorf("t.csv:\n%s", b)
	}
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{"potting.toml"}, "--material NAME is required"},
		{[]string{"potting.toml", "--material", "potting-resin-a"}, `did you mean "potting-resin-A"?`},
		{[]string{"potting.toml", "--material", "fr4"}, `material "fr4" does not cure`},
		{[]string{"potting.toml", "--material", "potting-resin-A", "--from", "40"}, "--from"},
		{[]string{"potting.toml", "--material", "potting-resin-A", "--step", "-5 K"}, "--step must be positive"},
		{[]string{"potting.toml", "--material", "potting-resin-A", "--cure", "1.5"}, "--cure must be in (0, 1]"},
		{[]string{"missing.toml", "--material", "x"}, "missing.toml"},
	} {
		code, _, errs := cl(t, append([]string{"ttt"}, tc.args...)...)
		if code != 2 || !strings.Contains(errs, tc.want) {
			t.Errorf("ttt %q: exit %d, stderr:\n%s\nwant %q", tc.args, code, errs, tc.want)
		}
	}
}
