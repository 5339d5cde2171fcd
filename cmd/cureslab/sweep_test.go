package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestParseShard(t *testing.T) {
	env := func(kv ...string) func(string) string {
		m := map[string]string{}
		for i := 0; i+1 < len(kv); i += 2 {
			m[kv[i]] = kv[i+1]
		}
		return func(k string) string { return m[k] }
	}
	for _, tc := range []struct {
		name      string
		spec      string
		shards    int
		shardsSet bool
		env       func(string) string
		i, n      int
		inErr     string
	}{
		{name: "none", env: env(), i: 0, n: 1},
		{name: "1/3", spec: "1/3", env: env(), i: 1, n: 3},
		{name: "3/3", spec: "3/3", env: env(), inErr: "not in 0 to N-1"},
		{name: "-1/3", spec: "-1/3", env: env(), inErr: "not in 0 to N-1"},
		{name: "x", spec: "x", env: env(), inErr: "want I/N"},
		{name: "slurm", spec: "slurm", env: env("SLURM_ARRAY_TASK_ID", "2", "SLURM_ARRAY_TASK_COUNT", "4"), i: 2, n: 4},
		{name: "slurm from 1", spec: "slurm", env: env("SLURM_ARRAY_TASK_ID", "4", "SLURM_ARRAY_TASK_COUNT", "4", "SLURM_ARRAY_TASK_MIN", "1"), i: 3, n: 4},
		{name: "slurm step", spec: "slurm", env: env("SLURM_ARRAY_TASK_ID", "2", "SLURM_ARRAY_TASK_COUNT", "4", "SLURM_ARRAY_TASK_STEP", "2"), inErr: "step of 2"},
		{name: "slurm unset", spec: "slurm", env: env(), inErr: "SLURM_ARRAY_TASK_ID is not set"},
		{name: "k8s", spec: "k8s", shards: 5, shardsSet: true, env: env("JOB_COMPLETION_INDEX", "4"), i: 4, n: 5},
		{name: "k8s without shards", spec: "k8s", env: env("JOB_COMPLETION_INDEX", "4"), inErr: "needs --shards"},
		{name: "k8s bad index", spec: "k8s", shards: 2, shardsSet: true, env: env("JOB_COMPLETION_INDEX", "x"), inErr: "not a whole number"},
		{name: "shards without k8s", spec: "1/2", shards: 2, shardsSet: true, env: env(), inErr: "--shards goes with --shard k8s"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			i, n, err := parseShard(tc.spec, tc.shards, tc.shardsSet, tc.env)
			if tc.inErr != "" {
				if err == nil || !strings.Contains(err.Error(), tc.inErr) {
					t.Errorf("got %d/%d, %v; want an error containing %q", i, n, err, tc.inErr)
				}
				return
			}
			if err != nil || i != tc.i || n != tc.n {
				t.Errorf("got %d/%d, %v; want %d/%d", i, n, err, tc.i, tc.n)
			}
		})
	}
}

// TestSweepCommand runs the commands end to end on the tiny test case:
// exit statuses, three shards merged against the whole sweep, usage errors.
func TestSweepCommand(t *testing.T) {
	caseFile, err := filepath.Abs("../../testdata/sweep/tiny.toml")
	if err != nil {
		t.Fatal(err)
	}
	dir := chdir(t)
	vary := []string{"--vary", "layer.resin.thickness=1mm,2mm,4mm", "--vary", "top.h=10W/m^2/K:30W/m^2/K:3"}

	code, out, errs := cl(t, append([]string{"sweep", caseFile, "-j", "2"}, vary...)...)
	// The 4 mm runs fail min_cure (see the case), none runs away: exit 1.
	if code != exitCriteria || !strings.Contains(out, "9 of 9 runs done") || errs != "" {
		t.Fatalf("sweep: exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	whole := filepath.Join(dir, "tiny-sweep", "summary.csv")
	want, err := os.ReadFile(whole)
	if err != nil {
		t.Fatal(err)
	}
	var shards []string
	for i := range 3 {
		d := "shard-" + string(rune('0'+i))
		code, _, errs := cl(t, append([]string{"sweep", caseFile, "--shard", string(rune('0'+i)) + "/3", "-o", d}, vary...)...)
		if code == exitUsage {
			t.Fatalf("shard %d: %s", i, errs)
		}
		shards = append(shards, d)
	}
	code, out, errs = cl(t, append([]string{"merge", "-o", "merged"}, shards...)...)
	if code != exitCriteria || !strings.Contains(out, "9 of 9 runs merged") {
		t.Fatalf("merge: exit %d\n%s%s", code, out, errs)
	}
	got, _ := os.ReadFile(filepath.Join("merged", "summary.csv"))
	if !bytes.Equal(got, want) {
		t.Errorf("merged summary.csv differs:\n%s\nwant:\n%s", got, want)
	}
	// merge draws the sweep page; report redraws it (and a run's page is
	// not attempted in a sweep directory).
	page, err := os.ReadFile(filepath.Join("merged", "report.html"))
	if err != nil || !strings.Contains(out, "report in merged") || !bytes.Contains(page, []byte("<svg")) {
		t.Errorf("merge wrote no sweep report (%v):\n%s", err, out)
	}
	os.Remove(filepath.Join("merged", "report.html"))
	code, out, errs = cl(t, "report", "merged")
	if page, err := os.ReadFile(filepath.Join("merged", "report.html")); code != exitOK || err != nil || !bytes.Contains(page, []byte("9 runs")) {
		t.Errorf("report of a sweep directory: exit %d, %v\n%s%s", code, err, out, errs)
	}
	if page, _ := os.ReadFile(filepath.Join("merged", "report.html")); !bytes.Contains(page, []byte("Sorted by status")) {
		t.Errorf("a sweep page without the case file should be sorted by status")
	}
	// With the case file the page is sorted by the criteria's margins; a
	// different file is refused and nothing is written.
	code, out, errs = cl(t, "report", "merged", "--case", caseFile)
	if page, _ := os.ReadFile(filepath.Join("merged", "report.html")); code != exitOK || !bytes.Contains(page, []byte("smallest margin to a criterion limit")) {
		t.Errorf("report --case: exit %d\n%s%s", code, out, errs)
	}
	other := filepath.Join(dir, "other.toml")
	data, _ := os.ReadFile(caseFile)
	os.WriteFile(other, append(data, []byte("\n# edited\n")...), 0o644)
	code, _, errs = cl(t, "report", "merged", "--case", other)
	if code != exitUsage || !strings.Contains(errs, "is not the case of the sweep") {
		t.Errorf("report --case with another file: exit %d\n%s", code, errs)
	}
	code, _, errs = cl(t, append([]string{"merge", "-o", "merged-case", "--case", other}, shards...)...)
	if _, err := os.Stat("merged-case"); code != exitUsage || err == nil || !strings.Contains(errs, "is not the case of the sweep") {
		t.Errorf("merge --case with another file: exit %d, %v\n%s", code, err, errs)
	}
	code, out, errs = cl(t, append([]string{"merge", "-o", "merged-case", "--case", caseFile}, shards...)...)
	if page, _ := os.ReadFile(filepath.Join("merged-case", "report.html")); code != exitCriteria || !bytes.Contains(page, []byte("smallest margin to a criterion limit")) {
		t.Errorf("merge --case: exit %d\n%s%s", code, out, errs)
	}
	code, _, _ = cl(t, append([]string{"merge", "-o", "merged-bare", "--no-report"}, shards...)...)
	if _, err := os.Stat(filepath.Join("merged-bare", "report.html")); code != exitCriteria || err == nil {
		t.Errorf("merge --no-report: exit %d, report.html written", code)
	}
	code, _, errs = cl(t, "merge", "-o", "part", shards[0], shards[1])
	if code != exitUsage || !strings.Contains(errs, "3 of 9 runs are missing (2, 5, 8)") {
		t.Errorf("merge with a shard missing: exit %d\n%s", code, errs)
	}
	code, _, errs = cl(t, "merge", "-o", "part", "--allow-missing", shards[0], shards[1])
	if code != exitFailure || !strings.Contains(errs, "3 runs missing: 2, 5, 8") {
		t.Errorf("merge --allow-missing: exit %d\n%s", code, errs)
	}

	// A runaway makes the exit status 3.
	code, out, errs = cl(t, "sweep", caseFile, "--vary", "materials.tiny-resin.cure.total_heat=300J/g,100000J/g", "-o", "hot")
	if code != exitFailure || !strings.Contains(out, "1 runaway") {
		t.Errorf("sweep with a runaway: exit %d\n%s%s", code, out, errs)
	}

	for _, tc := range []struct {
		args  []string
		inErr string
	}{
		{[]string{"sweep"}, "expects one case file"},
		{[]string{"sweep", caseFile}, "nothing to vary"},
		{[]string{"sweep", caseFile, "--vary", "top.hh=1W/m^2/K"}, `did you mean "h"?`},
		{[]string{"sweep", caseFile, "--vary", "top.h"}, "want KEY=V1,V2"},
		{[]string{"sweep", caseFile, "--vary", "top.h=1W/m^2/K", "--shard", "3/3"}, "not in 0 to N-1"},
		{[]string{"sweep", caseFile, "--vary", "top.h=1W/m^2/K", "-j", "0"}, "-j wants at least 1"},
		{[]string{"sweep", caseFile, "--vary", "top.h=1W/m^2/K", "--samples", "3"}, "--samples goes with"},
		{[]string{"sweep", caseFile, "--vary", "layer.resin.thickness=1mm,2mm"}, "holds another sweep"},
		{[]string{"sweep", "missing.toml", "--vary", "top.h=1W/m^2/K"}, "cannot read the case file"},
		{[]string{"merge"}, "expects at least one sweep directory"},
		{[]string{"merge", "nowhere"}, "not a sweep directory"},
	} {
		code, _, errs := cl(t, tc.args...)
		if code != exitUsage || !strings.Contains(errs, tc.inErr) {
			t.Errorf("cureslab %q: exit %d, want 2 with %q in\n%s", tc.args, code, tc.inErr, errs)
		}
	}
}

// TestSweepNotesProbeLeftOut: a run whose thinner stack leaves a probe
// below it says so on the terminal, besides its row and sweep.log.
func TestSweepNotesProbeLeftOut(t *testing.T) {
	chdir(t)
	writeExample(t, "thick-potting-oven", "pot.toml")
	code, out, errs := cl(t, "sweep", "pot.toml", "--vary", "layer.potting.thickness=6mm,12mm", "-j", "1", "--no-report", "-o", "sw")
	if code != exitOK && code != exitCriteria {
		t.Fatalf("exit %d\n%s%s", code, out, errs)
	}
	want := "note: 1 run (0): left out the probes below the 9.6 mm stack of this run: output.probes.2 (12 mm), output.probes.3 (13.6 mm), output.probes.4 (15.6 mm)"
	if !strings.Contains(out, want) {
		t.Errorf("stdout lacks %q:\n%s", want, out)
	}
}
