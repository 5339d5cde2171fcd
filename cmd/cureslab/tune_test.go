package main

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

func TestTuneCommand(t *testing.T) {
	hold, err := filepath.Abs("../../testdata/tune/hold.toml")
	if err != nil {
		t.Fatal(err)
	}
	dir := chdir(t)
	const free = "schedules.oven.segments.1.hold=5min:120min"

	code, out, errs := cl(t, "tune", hold, "--program", "oven", "--free", free, "-j", "2", "-o", "out")
	if code != exitOK || !strings.Contains(out, "limiting criterion: min_cure") || !strings.Contains(out, "saving") {
		t.Fatalf("tune: exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	for _, f := range []string{"tuned.toml", "tune.csv"} {
		if _, err := os.Stat(filepath.Join(dir, "out", f)); err != nil {
			t.Errorf("%s not written: %v", f, err)
		}
	}
	// Times for reading carry no six decimals: "1.23 h (4428 s)".
	tuned, _ := os.ReadFile(filepath.Join(dir, "out", "tuned.toml"))
	long := regexp.MustCompile(`\d\.\d{4,} s\b`)
	for name, text := range map[string]string{"stdout": out, "tuned.toml": string(tuned)} {
		if m := long.FindString(text); m != "" {
			t.Errorf("%s writes a time as %q:\n%s", name, m, text)
		}
	}
	if !regexp.MustCompile(`cycle time [0-9.]+ (min|h) \(\d+ s\)`).MatchString(out) {
		t.Errorf("no readable cycle time in:\n%s", out)
	}

	// No program in the range meets min_cure: exit 1, tune.csv only.
	code, out, _ = cl(t, "tune", hold, "--program", "oven", "--free", "schedules.oven.segments.1.hold=1min:10min", "-o", "none")
	if code != exitCriteria || !strings.Contains(out, "NO PROGRAM") {
		t.Errorf("infeasible range: exit %d\n%s", code, out)
	}
	if _, err := os.Stat(filepath.Join(dir, "none", "tuned.toml")); err == nil {
		t.Errorf("tuned.toml written although nothing meets the criteria")
	}

	for _, tc := range []struct {
		args []string
		msg  string
	}{
		{[]string{"tune", hold}, "--program NAME"},
		{[]string{"tune", hold, "--program", "ovne"}, `did you mean "oven"?`},
		{[]string{"tune", hold, "--program", "oven", "--free", "x"}, "--free x: want KEY=LO:HI"},
		{[]string{"tune", hold, "--program", "oven", "--robust", "3"}, "[uncertainty]"},
		{[]string{"tune", hold, "--program", "oven", "-j", "0"}, "-j wants at least 1"},
		{[]string{"tune"}, "expects one case file"},
		{[]string{"tune", "missing.toml", "--program", "oven"}, "cannot read"},
	} {
		code, _, errs := cl(t, tc.args...)
		if code != exitUsage || !strings.Contains(errs, tc.msg) {
			t.Errorf("cureslab %q: exit %d, stderr %q; want 2 and %q", tc.args, code, errs, tc.msg)
		}
	}
}
