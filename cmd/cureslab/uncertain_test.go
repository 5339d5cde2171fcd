package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestRunUncertain(t *testing.T) {
	chdir(t)
	writeExample(t, "tile-on-spreader", "tile.toml")
	// Without [uncertainty]: refused before anything is written.
	if code, _, errs := cl(t, "run", "tile.toml", "--uncertain", "3", "-o", "none"); code != exitUsage || !strings.Contains(errs, "[uncertainty]") {
		t.Errorf("no [uncertainty]: exit %d, stderr %q; want 2 and a hint", code, errs)
	}
	if _, err := os.Stat("none"); !os.IsNotExist(err) {
		t.Errorf("the output directory was created for a refused run: %v", err)
	}

	text, err := os.ReadFile("tile.toml")
	if err != nil {
		t.Fatal(err)
	}
	text = append(text, "\n[uncertainty]\n\"top.h\" = \"±20 %\"\n"...)
	if err := os.WriteFile("tile-u.toml", text, 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := cl(t, "run", "tile-u.toml", "--uncertain", "4", "--seed", "3", "--no-report", "-o", "u")
	if code != exitOK {
		t.Fatalf("exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	b, err := os.ReadFile(filepath.Join("u", "uncertainty.csv"))
	if err != nil {
		t.Fatal(err)
	}
	// One header and one row per sample.
	if rows := strings.Count(strings.TrimSpace(string(b)), "\n") + 1; rows != 5 {
		t.Errorf("uncertainty.csv has %d lines, want 5:\n%s", rows, b)
	}
	var m map[string]json.RawMessage
	b, err = os.ReadFile(filepath.Join("u", "summary.json"))
	if err == nil {
		err = json.Unmarshal(b, &m)
	}
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := m["uncertainty"]; !ok {
		t.Errorf("summary.json lacks the uncertainty object:\n%s", b)
	}
}
