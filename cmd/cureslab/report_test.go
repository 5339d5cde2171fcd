package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestRunWritesReport(t *testing.T) {
	chdir(t)
	writeExample(t, "tile-on-spreader", "tile.toml")
	if code, out, errs := cl(t, "run", "tile.toml", "-o", "with"); code != 0 {
		t.Fatalf("run: exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	page, err := os.ReadFile(filepath.Join("with", "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(page), "Alumina tile bonded to an aluminium spreader") || !strings.Contains(string(page), "<svg") {
		t.Error("report.html lacks the title or the figures")
	}

	if code, out, errs := cl(t, "run", "tile.toml", "-o", "without", "--no-report"); code != 0 {
		t.Fatalf("run --no-report: exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	if _, err := os.Stat(filepath.Join("without", "report.html")); !os.IsNotExist(err) {
		t.Errorf("run --no-report wrote report.html (%v)", err)
	}
	if _, err := os.Stat(filepath.Join("without", "summary.json")); err != nil {
		t.Errorf("run --no-report: %v", err)
	}

	// report DIR draws it from the files.
	code, out, errs := cl(t, "report", "without")
	if code != 0 || !strings.Contains(out, filepath.Join("without", "report.html")) {
		t.Fatalf("report: exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	redrawn, err := os.ReadFile(filepath.Join("without", "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	if stripStamp(string(redrawn)) != stripStamp(string(page)) {
		t.Error("report DIR draws a different page from the one run writes")
	}
}

// stripStamp removes the time stamp of a report.
func stripStamp(s string) string {
	i := strings.Index(s, "drawn ")
	if i < 0 {
		return s
	}
	return s[:i] + s[i+len("drawn 2006-01-02 15:04 UTC"):]
}

func TestReportCommandErrors(t *testing.T) {
	chdir(t)
	os.Mkdir("empty", 0o755)
	os.WriteFile("afile", nil, 0o644)
	for _, tc := range []struct {
		args []string
		err  string
	}{
		{[]string{"report"}, "expects one output directory, got 0"},
		{[]string{"report", "a", "b"}, "expects one output directory, got 2"},
		{[]string{"report", "nowhere"}, "nowhere is not a directory"},
		{[]string{"report", "afile"}, "afile is not a directory"},
		{[]string{"report", "empty"}, filepath.Join("empty", "fields.csv") + ": missing"},
	} {
		code, out, errs := cl(t, tc.args...)
		if code != 2 || !strings.Contains(errs, tc.err) || out != "" {
			t.Errorf("%v: exit %d, stdout %q, stderr %q; want 2 and %q", tc.args, code, out, errs, tc.err)
		}
	}
	// A malformed file is named with its line.
	writeExample(t, "tile-on-spreader", "tile.toml")
	if code, _, errs := cl(t, "run", "tile.toml", "-o", "out", "--no-report"); code != 0 {
		t.Fatalf("run: exit %d: %s", code, errs)
	}
	b, _ := os.ReadFile(filepath.Join("out", "probes.csv"))
	lines := strings.SplitAfter(string(b), "\n")
	f := strings.SplitN(lines[4], ",", 3)
	lines[4] = f[0] + ",abc," + f[2] // a probe temperature that is not a number
	os.WriteFile(filepath.Join("out", "probes.csv"), []byte(strings.Join(lines, "")), 0o644)
	code, _, errs := cl(t, "report", "out")
	if want := filepath.Join("out", "probes.csv") + `:5:5: T_0mm_C: "abc" is not a number`; code != 2 || !strings.Contains(errs, want) {
		t.Errorf("malformed probes.csv: exit %d, stderr %q; want 2 and %q", code, errs, want)
	}
	if _, err := os.Stat(filepath.Join("out", "report.html")); !os.IsNotExist(err) {
		t.Error("report.html written from a malformed directory")
	}
	// A folder that only holds output folders (a demo's): named, not read
	// as a run.
	os.MkdirAll(filepath.Join("parent", "b"), 0o755)
	os.Rename("out", filepath.Join("parent", "a"))
	os.WriteFile(filepath.Join("parent", "b", "compare.csv"), nil, 0o644)
	code, _, errs = cl(t, "report", "parent")
	if want := "parent holds no run of its own, only the output folders a, b: give one of them, e.g. cureslab report " + filepath.Join("parent", "a"); code != 2 || !strings.Contains(errs, want) {
		t.Errorf("a folder of output folders: exit %d, stderr %q; want 2 and %q", code, errs, want)
	}
}

func TestNoReportFlag(t *testing.T) {
	for _, name := range []string{"run", "demo"} {
		_, out, _ := cl(t, name, "--help")
		if !strings.Contains(out, "--no-report") {
			t.Errorf("%s --help does not list --no-report", name)
		}
	}
}
