package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"flag"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"

	"cureslab/cases"
	"cureslab/cases/results"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata")

// cl runs the command line and returns the exit status, stdout and stderr.
func cl(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return code, out.String(), errb.String()
}

func golden(t *testing.T, name, got string) {
	t.Helper()
	path := filepath.Join("testdata", name)
	if *update {
		os.MkdirAll("testdata", 0o755)
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (go test -update creates it)", err)
	}
	if got != string(want) {
		t.Errorf("output differs from %s (go test -update rewrites it)\ngot:\n%s\nwant:\n%s", path, got, want)
	}
}

// chdir runs the test in a fresh temporary working directory.
func chdir(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	t.Chdir(dir)
	return dir
}

func TestUsage(t *testing.T) {
	for _, tc := range []struct {
		args     []string
		code     int
		inStdout string
		inStderr string
	}{
		{nil, 2, "", "Usage: cureslab COMMAND"},
		{[]string{"help"}, 0, "Usage: cureslab COMMAND", ""},
		{[]string{"--help"}, 0, "Usage: cureslab COMMAND", ""},
		{[]string{"-h"}, 0, "Usage: cureslab COMMAND", ""},
		{[]string{"bogus"}, 2, "", `unknown command "bogus"`},
		{[]string{"rnu"}, 2, "", `did you mean "run"?`},
		{[]string{"--bogus"}, 2, "", "Run 'cureslab help' for usage."},
		{[]string{"help", "run"}, 0, "Usage: cureslab run CASE.toml [-o DIR]", ""},
		{[]string{"help", "nope"}, 2, "", `unknown command "nope"`},
		{[]string{"help", "a", "b"}, 2, "", "Run 'cureslab help help' for usage."},
		{[]string{"run", "--bogus"}, 2, "", "unknown flag: --bogus\nRun 'cureslab help run' for usage.\n"},
		{[]string{"run", "-o"}, 2, "", "Run 'cureslab help run' for usage."},
		{[]string{"run"}, 2, "", "expects one case file, got 0 arguments"},
		{[]string{"run", "a.toml", "b.toml"}, 2, "", "expects one case file, got 2 arguments"},
		{[]string{"check"}, 2, "", "Run 'cureslab help check' for usage."},
		{[]string{"demo", "extra"}, 2, "", "takes no arguments"},
		{[]string{"example", "nope"}, 2, "", `no example named "nope"`},
		{[]string{"materials", "alumnia"}, 2, "", `did you mean "alumina"?`},
		{[]string{"sweep", "case.toml", "--vary", "x=1,2"}, 2, "", "cannot read the case file"},
		{[]string{"tune", "-h"}, 0, "Usage: cureslab tune CASE.toml", ""},
	} {
		t.Run(strings.Join(tc.args, " "), func(t *testing.T) {
			code, out, errs := cl(t, tc.args...)
			if code != tc.code || !strings.Contains(out, tc.inStdout) || !strings.Contains(errs, tc.inStderr) {
				t.Errorf("cureslab %q: exit %d, want %d\nstdout:\n%s\nstderr:\n%s\nwant stdout to contain %q and stderr %q",
					tc.args, code, tc.code, out, errs, tc.inStdout, tc.inStderr)
			}
		})
	}
}

func TestHelpGolden(t *testing.T) {
	_, out, _ := cl(t, "help")
	golden(t, "help.golden", out)
	for _, c := range commands {
		code, out, errs := cl(t, c.Name, "--help")
		if code != 0 || errs != "" {
			t.Errorf("%s --help: exit %d, stderr %q", c.Name, code, errs)
		}
		_, ex, _ := strings.Cut(out, "Example:\n")
		if !strings.Contains("\n"+ex, "\n  cureslab "+c.Name+" ") {
			t.Errorf("%s --help shows no example of itself:\n%s", c.Name, out)
		}
		if _, short, _ := cl(t, c.Name, "-h"); short != out {
			t.Errorf("%s: -h and --help differ", c.Name)
		}
		golden(t, "help_"+c.Name+".golden", out)
	}
}

func TestExitCode(t *testing.T) {
	// The exit statuses of the README: 0 ok, 1 a criterion failed, 3 runaway or numerical failure.
	for status, want := range map[string]int{
		results.StatusOK: 0, results.StatusCriteriaFailed: 1, results.StatusRunaway: 3, results.StatusFailed: 3, "": 3,
	} {
		if got := exitCode(status); got != want {
			t.Errorf("exitCode(%q) = %d, want %d", status, got, want)
		}
	}
}

func TestExampleCommand(t *testing.T) {
	code, out, _ := cl(t, "example")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	for _, name := range cases.ExampleNames() {
		if !strings.Contains(out, name) {
			t.Errorf("example list lacks %s:\n%s", name, out)
		}
		code, text, _ := cl(t, "example", name)
		ex, _ := cases.ExampleByName(name)
		if code != 0 || text != string(ex.Text) {
			t.Errorf("example %s: exit %d, text differs from the embedded case", name, code)
		}
	}
}

func TestMaterialsCommand(t *testing.T) {
	code, out, _ := cl(t, "materials")
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if code != 0 || len(lines)-1 < 12 {
		t.Fatalf("exit %d, %d materials listed, want at least 12:\n%s", code, len(lines)-1, out)
	}
	// Source: Incropera Table A.2, aluminium oxide polycrystalline
	// at 300 K: rho 3970, cp 765, k 36.0.
	if !strings.Contains(out, "alumina             3970            765                   36 ") {
		t.Errorf("alumina row not as published:\n%s", out)
	}
	code, out, _ = cl(t, "materials", "fr4")
	// Source: Sarvar, Poole & Witting 1990, J. Electron. Mater. 19:1345,
	// FR-4 through-plane k 0.343.
	if code != 0 || !strings.Contains(out, "conductivity 0.343 W/m/K") || !strings.Contains(out, "Sarvar") {
		t.Errorf("materials fr4: exit %d\n%s", code, out)
	}
}

const badCase = `title = "bad"
[initial]
temperature = "23 C"
[[layer]]
name = "a"
material = "alumina"
thickness = 5
[top]
kind = "insulated"
[bottom]
kind = "insulated"
[time]
end = "1 h"
`

func TestRunBadCaseWritesNothing(t *testing.T) {
	dir := chdir(t)
	if err := os.WriteFile("bad.toml", []byte(badCase), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, args := range [][]string{{"run", "bad.toml"}, {"run", "bad.toml", "-o", "out"}, {"check", "bad.toml"}} {
		code, out, errs := cl(t, args...)
		if code != 2 || !strings.Contains(errs, "bad.toml:7") || out != "" {
			t.Errorf("%q: exit %d, stdout %q, stderr:\n%s\nwant exit 2 and the error with its line", args, code, out, errs)
		}
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("the working directory holds %d entries after refused runs, want only bad.toml", len(entries))
	}
	if code, _, errs := cl(t, "run", "missing.toml"); code != 2 || !strings.Contains(errs, "missing.toml") {
		t.Errorf("missing file: exit %d, stderr %q", code, errs)
	}
}

// writeExample writes an embedded example to name in the working directory.
func writeExample(t *testing.T, example, name string) {
	t.Helper()
	ex, ok := cases.ExampleByName(example)
	if !ok {
		t.Fatalf("no example %s", example)
	}
	if err := os.WriteFile(name, ex.Text, 0o644); err != nil {
		t.Fatal(err)
	}
}

func readSummary(t *testing.T, dir string) results.Summary {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	var s results.Summary
	if err := json.Unmarshal(b, &s); err != nil {
		t.Fatal(err)
	}
	return s
}

func TestRunAndCheck(t *testing.T) {
	chdir(t)
	writeExample(t, "tile-on-spreader", "tile.toml")
	code, out, errs := cl(t, "run", "tile.toml")
	if code != exitCode(readSummary(t, "tile-out").Status) {
		t.Errorf("exit %d does not match the status in summary.json", code)
	}
	if code != 0 || !strings.Contains(out, "outputs in ./tile-out") {
		t.Errorf("run: exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	for _, f := range []string{"fields.csv", "probes.csv", "summary.json"} {
		if _, err := os.Stat(filepath.Join("tile-out", f)); err != nil {
			t.Error(err)
		}
	}
	code, out, _ = cl(t, "check", "tile.toml")
	if code != 0 || !strings.Contains(out, "Biot numbers") || !strings.Contains(out, "Cautions") {
		t.Errorf("check: exit %d\n%s", code, out)
	}
	// An output path that is a file is refused before the run.
	os.WriteFile("afile", nil, 0o644)
	if code, _, errs := cl(t, "run", "tile.toml", "-o", "afile"); code != 2 || !strings.Contains(errs, "not a directory") {
		t.Errorf("-o onto a file: exit %d, stderr %q", code, errs)
	}
}

func TestRunaway(t *testing.T) {
	chdir(t)
	// The oven reaches 120 C, the abort limit is 100 C: the run stops with
	// status runaway, exit 3, and keeps its outputs.
	ex, _ := cases.ExampleByName("tile-on-spreader")
	text := strings.Replace(string(ex.Text), "[time]\n", "[time]\nabort_temperature = \"100 C\"\n", 1)
	os.WriteFile("hot.toml", []byte(text), 0o644)
	code, out, errs := cl(t, "run", "hot.toml", "-o", "hot")
	if code != 3 || !strings.Contains(errs, "runaway") || !strings.Contains(out, "RUNAWAY") {
		t.Fatalf("exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	s := readSummary(t, "hot")
	if s.Status != results.StatusRunaway || s.Message == "" {
		t.Errorf("summary status %q, message %q", s.Status, s.Message)
	}
}

func TestDemo(t *testing.T) {
	chdir(t)
	code, out, errs := cl(t, "demo", "-o", "tmp")
	// Every example meets its criteria: the demo exits 0, as run would.
	if code != 0 {
		t.Fatalf("demo: exit %d, want 0\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	worst := 0
	for _, name := range cases.ExampleNames() {
		dir := filepath.Join("tmp", name)
		for _, f := range []string{"fields.csv", "probes.csv", "summary.json"} {
			if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
				t.Error(err)
			}
		}
		if c := exitCode(readSummary(t, dir).Status); c != exitOK {
			t.Errorf("example %s: status %s, want every criterion met", name, readSummary(t, dir).Status)
			worst = max(worst, c)
		}
		if !strings.Contains(out, "== "+name+":") {
			t.Errorf("demo output lacks the header of %s", name)
		}
	}
	if code != worst {
		t.Errorf("demo exit %d, want %d from the runs", code, worst)
	}
	// The demo says what volumetric heating buys: far less overshoot for
	// the same cure, at the price of time.
	if !regexp.MustCompile(`volumetric heating against the oven: overshoot \+\d+\.\d K against \+\d+\.\d K, least final cure 0\.\d+ against 0\.\d+; min_cure reached after [0-9.]+ (min|h) against [0-9.]+ (min|h), program end`).MatchString(out) {
		t.Errorf("the demo does not say what volumetric heating buys:\n%s", out)
	}
	// The examples' folders are beside the comparisons'.
	namesCasePages(t, filepath.Join("tmp", "compare"), "../thick-potting-oven/report.html", "../thick-potting-microwave/report.html")
	namesCasePages(t, filepath.Join("tmp", "compare-6ghz"), "../thick-potting-6ghz/report.html", "../thick-potting-6ghz-swept/report.html")

	// Interrupted as its first example starts, before any example has
	// finished, a demo into the same directory writes nothing: the
	// earlier demo stays whole, as an earlier comparison does.
	full := dirNames(t, "tmp")
	names := cases.ExampleNames()
	var errb bytes.Buffer
	e := &env{ctx: onceExists{context.Background(), filepath.Join("tmp", names[0]+".staging"), new(bool)}, stdout: io.Discard, stderr: &errb, cmd: demoCmd}
	if code := runDirect(t, e, demoCmd, "-o", "tmp"); code != exitInterrupted {
		t.Fatalf("demo interrupted at once: exit %d, want 130\nstderr:\n%s", code, errb.String())
	}
	if w := "interrupted before the first example finished: nothing was written; tmp holds what it held before"; !strings.Contains(errb.String(), w) {
		t.Errorf("the demo interrupted at once does not say %q:\n%s", w, errb.String())
	}
	if strings.Contains(errb.String(), "hold the state up to then") {
		t.Errorf("the demo interrupted at once speaks of outputs it did not keep:\n%s", errb.String())
	}
	if left := dirNames(t, "tmp"); !slices.Equal(left, full) || len(full) != len(demoNames())+1 {
		t.Errorf("after a demo interrupted at once the directory holds %v, want the earlier demo whole: %v", left, full)
	}
	if s := readSummary(t, filepath.Join("tmp", names[0])); s.Status != results.StatusOK {
		t.Errorf("%s: status %q, want the earlier demo's ok", names[0], s.Status)
	}
	// Into a new directory, the same interruption leaves no directory.
	errb.Reset()
	e = &env{ctx: onceExists{context.Background(), filepath.Join("new", names[0]+".staging"), new(bool)}, stdout: io.Discard, stderr: &errb, cmd: demoCmd}
	if code := runDirect(t, e, demoCmd, "-o", "new"); code != exitInterrupted || !strings.Contains(errb.String(), "nothing was written; new was not created") {
		t.Errorf("demo into a new directory interrupted at once: exit %d, want 130 and a note\nstderr:\n%s", code, errb.String())
	}
	if _, err := os.Lstat("new"); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("demo into a new directory interrupted at once: %v, want no directory", err)
	}

	// Interrupted as its second example starts, a demo into the same
	// directory leaves exactly what it computed: the first example, the
	// second marked interrupted, no folder of the first demo's other
	// examples, no comparison built on them.
	errb.Reset()
	e = &env{ctx: onceExists{context.Background(), filepath.Join("tmp", names[1]+".staging"), new(bool)}, stdout: io.Discard, stderr: &errb, cmd: demoCmd}
	if code := runDirect(t, e, demoCmd, "-o", "tmp"); code != exitInterrupted {
		t.Fatalf("interrupted demo: exit %d, want 130\nstderr:\n%s", code, errb.String())
	}
	for _, w := range []string{"interrupted", "the examples after " + names[1] + " were not run", "no comparison was made", "holds only what this demo computed"} {
		if !strings.Contains(errb.String(), w) {
			t.Errorf("the interrupted demo does not say %q:\n%s", w, errb.String())
		}
	}
	if s := readSummary(t, filepath.Join("tmp", names[0])); s.Status != results.StatusOK {
		t.Errorf("%s: status %q, want ok", names[0], s.Status)
	}
	if s := readSummary(t, filepath.Join("tmp", names[1])); s.Status != results.StatusInterrupted {
		t.Errorf("%s: status %q, want interrupted", names[1], s.Status)
	}
	if left, want := dirNames(t, "tmp"), []string{".cureslab-set.json", names[0], names[1]}; !slices.Equal(left, want) {
		t.Errorf("after the interrupted demo the directory holds %v, want %v", left, want)
	}

	// A demo into a run's directory is refused, naming what is there.
	code, _, errs = cl(t, "demo", "-o", filepath.Join("tmp", names[0]))
	if code != exitUsage || !strings.Contains(errs, "holds a run's output") {
		t.Errorf("demo into a run's directory: exit %d\n%s", code, errs)
	}
}

// dirNames returns the names in dir, sorted.
func dirNames(t *testing.T, dir string) []string {
	t.Helper()
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, d := range ents {
		names = append(names, d.Name())
	}
	return names
}

// runDirect runs command c with e as it is, without the signal context
// of Command.run (which would hide a context that reports its
// cancellation through Err alone, such as onceExists).
func runDirect(t *testing.T, e *env, c *Command, args ...string) int {
	t.Helper()
	fs, _ := c.flagSet(e.stderr)
	runner := c.Setup(fs)
	if err := fs.Parse(args); err != nil {
		t.Fatal(err)
	}
	return runner(e, fs.Args())
}

// onceExists is a context cancelled from the moment the file path exists
// on: a Ctrl-C at a known point of the work.
type onceExists struct {
	context.Context
	path string
	seen *bool
}

func (c onceExists) Err() error {
	if _, err := os.Stat(c.path); err == nil || *c.seen {
		*c.seen = true
		return context.Canceled
	}
	return nil
}

func TestInterrupted(t *testing.T) {
	chdir(t)
	writeExample(t, "tile-on-spreader", "tile.toml")
	ctx, cancel := context.WithCancel(context.Background())
	cancel() // as if Ctrl-C came before the work started

	var out, errb bytes.Buffer
	e := &env{ctx: ctx, stdout: &out, stderr: &errb}
	if code := runCmd.run(e, []string{"tile.toml", "-o", "cut"}); code != 130 || !strings.Contains(errb.String(), "interrupted") {
		t.Errorf("run: exit %d, want 130 and a note\nstdout:\n%s\nstderr:\n%s", code, out.String(), errb.String())
	}
	// Interrupted while reading the case: nothing was computed, nothing is
	// written. (An interruption during the run keeps its outputs: see the
	// attack table, run-sigint.)
	if _, err := os.Stat("cut"); !os.IsNotExist(err) {
		t.Errorf("an interrupted run created its directory: %v", err)
	}

	out.Reset()
	errb.Reset()
	e = &env{ctx: ctx, stdout: &out, stderr: &errb}
	if code := demoCmd.run(e, []string{"-o", "demo"}); code != 130 || !strings.Contains(errb.String(), "interrupted") {
		t.Errorf("demo: exit %d, want 130 and a note\nstderr:\n%s", code, errb.String())
	}
	if _, err := os.Stat("demo"); !os.IsNotExist(err) {
		t.Errorf("an interrupted demo created its directory: %v", err)
	}
}

// TestRunVerify: run --verify prints the estimated error once and records
// it in summary.json; without --verify neither appears; sweep has no such
// flag (only run verifies).
func TestRunVerify(t *testing.T) {
	chdir(t)
	writeExample(t, "tile-on-spreader", "tile.toml")
	code, out, errs := cl(t, "run", "tile.toml", "--verify", "--no-report")
	if code != 0 || strings.Count(out, "estimated error") != 1 || !strings.Contains(out, "tolerances 10 times tighter") {
		t.Fatalf("run --verify: exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	if s := readSummary(t, "tile-out"); s.EstimatedError == nil || !(math.Abs(float64(s.EstimatedError.PeakTemperatureK)) < 0.5) {
		t.Errorf("summary.json estimated_error %+v", s.EstimatedError)
	}
	if _, out, _ = cl(t, "run", "tile.toml", "--no-report"); strings.Contains(out, "estimated error") {
		t.Errorf("estimated error printed without --verify:\n%s", out)
	}
	if s := readSummary(t, "tile-out"); s.EstimatedError != nil {
		t.Errorf("estimated_error written without --verify: %+v", s.EstimatedError)
	}
	if code, _, errs := cl(t, "sweep", "tile.toml", "--verify"); code != 2 || !strings.Contains(errs, "verify") {
		t.Errorf("sweep --verify: exit %d, stderr %q", code, errs)
	}
}
