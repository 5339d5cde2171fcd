package results

import (
	"bytes"
	"cureslab/cases/internal/num"
	"cureslab/cases/internal/testkit"
	"cureslab/cases/internal/textout"
	"encoding/csv"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

func TestWriteRunGolden(t *testing.T) {
	dir := t.TempDir()
	c, r := testkit.HandBuiltCase(t), testkit.HandBuiltResult()
	if err := WriteRun(dir, c, r, Summarize(c, r)); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{FieldsFile, ProbesFile, SummaryFile} {
		got, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		testkit.Golden(t, "write_"+strings.ReplaceAll(name, ".", "_")+".golden", got)
	}
}

func TestWriteRunColumns(t *testing.T) {
	dir := t.TempDir()
	c, r := testkit.HandBuiltCase(t), testkit.HandBuiltResult()
	if err := WriteRun(dir, c, r, Summarize(c, r)); err != nil {
		t.Fatal(err)
	}
	fields := testkit.ReadCSV(t, filepath.Join(dir, FieldsFile))
	// Header names are fixed (README, Case file reference).
	if got, want := strings.Join(fields[0], ","), "time_s,depth_mm,layer,temperature_C,cure,cure_rate_per_s,glass_transition_C"; got != want {
		t.Errorf("fields.csv header = %q, want %q", got, want)
	}
	if got, want := len(fields), 1+len(r.Snapshots)*c.Problem.Mesh.Cells(); got != want {
		t.Errorf("fields.csv has %d rows, want %d (header + snapshots × cells)", got, want)
	}
	for _, row := range fields[1:] {
		curing := row[2] == "resin"
		for col := 4; col <= 6; col++ {
			if !curing && row[col] != "" {
				t.Errorf("row %v: column %s of a layer that does not cure = %q, want empty", row, fields[0][col], row[col])
			}
		}
	}
	// The second resin cell at the second snapshot has a NaN glass
	// transition: an empty cell, while its cure is written.
	last := fields[1+c.Problem.Mesh.Cells()+1]
	if last[2] != "resin" || last[4] != "0.82" || last[6] != "" {
		t.Errorf("row %v: want resin, cure 0.82 and an empty glass transition", last)
	}
	// 393.15000000000003 K is 120 °C once rounded to 1e-6 K; -0 is 0. The
	// time is written as the shortest decimal that reads back exactly: a
	// time 0.1 µs past the hour stays distinct from the hour.
	if row := fields[1+c.Problem.Mesh.Cells()]; row[3] != "120" || row[0] != "3600.0000001" {
		t.Errorf("row %v: want time 3600.0000001 and temperature 120", row)
	}
	if last[5] != "0" {
		t.Errorf("cure rate -0 written as %q, want 0", last[5])
	}

	probes := testkit.ReadCSV(t, filepath.Join(dir, ProbesFile))
	// Shortest decimal depth names (README, Case file reference); no air_bottom_C for an
	// insulated bottom face.
	want := "time_s,T_0mm_C,cure_0mm,T_6.35mm_C,cure_6.35mm,T_17.4625mm_C,cure_17.4625mm,air_top_C,heat_in_J_per_m2"
	if got := strings.Join(probes[0], ","); got != want {
		t.Errorf("probes.csv header = %q, want %q", got, want)
	}
	if got := probes[2][6]; got != "" {
		t.Errorf("cure of a probe in the board = %q, want empty", got)
	}
	if got := probes[2][8]; got != "123456.789" {
		t.Errorf("heat_in = %q, want 123456.789 (9 significant digits)", got)
	}
}

func TestFormatDepth(t *testing.T) {
	for _, tc := range []struct {
		depth float64 // m
		want  string  // mm
	}{
		// Source: analytic (1/4 in = 6.35 mm exactly, 11/16 in = 17.4625 mm).
		{6.35e-3, "6.35"},
		{17.4625e-3, "17.4625"},
		{0, "0"},
		{math.Copysign(0, -1), "0"},
		// 9.3e-3·1000 is 9.299999999999999 in float64, and
		// (12e-3 + 1.6e-3)·1000 is 13.600000000000001.
		{9.3e-3, "9.3"},
		{12e-3 + 1.6e-3, "13.6"},
		{0.3e-3, "0.3"},
		{1e-9, "0.000001"},
		{2, "2000"},
	} {
		if got := num.FormatDepth(tc.depth); got != tc.want {
			t.Errorf("FormatDepth(%v) = %q, want %q", tc.depth, got, tc.want)
		}
	}
	// The cases above matter: plain shortest formatting shows the noise.
	d := 9.3e-3 // a variable: constant arithmetic would be exact
	if s := strconv.FormatFloat(d*1000, 'f', -1, 64); s == "9.3" {
		t.Errorf("9.3e-3*1000 formats as %q: the rounding test above no longer tests anything", s)
	}
}

func TestOutFormats(t *testing.T) {
	for _, tc := range []struct {
		got, want string
	}{
		{num.Fixed(23.000000000000043, 6), "23"},
		{num.Fixed(-1e-9, 6), "0"},
		{num.Fixed(math.NaN(), 6), ""},
		{num.Fixed(1e7, 6), "10000000"},
		{num.Fixed(-12.3456789, 6), "-12.345679"},
		{num.Sig(math.NaN()), ""},
		{num.Sig(math.Copysign(0, -1)), "0"},
		{num.Sig(1.23456789012e-9), "1.23456789e-09"},
		{num.Sig(0.30000000000000004), "0.3"},
	} {
		if tc.got != tc.want {
			t.Errorf("got %q, want %q", tc.got, tc.want)
		}
	}
}

func TestWriteFileAtomic(t *testing.T) {
	dir := t.TempDir()
	write := func(s string) func(io.Writer) error {
		return func(w io.Writer) error { _, err := io.WriteString(w, s); return err }
	}
	if err := textout.WriteFileAtomic(dir, "a.txt", write("first")); err != nil {
		t.Fatal(err)
	}
	if err := textout.WriteFileAtomic(dir, "a.txt", write("second")); err != nil {
		t.Fatal(err)
	}
	assertFile := func(want string) {
		t.Helper()
		got, err := os.ReadFile(filepath.Join(dir, "a.txt"))
		if err != nil || string(got) != want {
			t.Fatalf("a.txt = %q, %v; want %q", got, err, want)
		}
		entries, err := os.ReadDir(dir)
		if err != nil {
			t.Fatal(err)
		}
		if len(entries) != 1 {
			var names []string
			for _, e := range entries {
				names = append(names, e.Name())
			}
			t.Fatalf("directory holds %v, want only a.txt (no temporary file left)", names)
		}
	}
	assertFile("second")
	if fi, err := os.Stat(filepath.Join(dir, "a.txt")); err != nil || fi.Mode().Perm() != 0o644 {
		t.Errorf("mode = %v, %v; want 0644", fi.Mode().Perm(), err)
	}

	// A write that fails half-way leaves the previous file and no temporary.
	boom := errors.New("boom")
	err := textout.WriteFileAtomic(dir, "a.txt", func(w io.Writer) error {
		io.WriteString(w, strings.Repeat("partial ", 100000)) // more than the buffer
		return boom
	})
	if !errors.Is(err, boom) {
		t.Fatalf("err = %v, want boom", err)
	}
	assertFile("second")

	// A directory that does not exist is an error, and nothing is created.
	missing := filepath.Join(dir, "missing")
	if err := textout.WriteFileAtomic(missing, "b.txt", write("x")); err == nil {
		t.Error("writing into a missing directory succeeded")
	}
	if _, err := os.Stat(missing); !os.IsNotExist(err) {
		t.Errorf("missing directory: stat err = %v, want not-exist", err)
	}
}

func TestWriteRunCreatesDirAndReplaces(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "a", "b")
	c, r := testkit.HandBuiltCase(t), testkit.HandBuiltResult()
	if err := WriteRun(dir, c, r, Summarize(c, r)); err != nil {
		t.Fatal(err)
	}
	// A second run into the same directory replaces the set whole.
	r.Snapshots = r.Snapshots[:1]
	if err := WriteRun(dir, c, r, Summarize(c, r)); err != nil {
		t.Fatal(err)
	}
	rows := testkit.ReadCSV(t, filepath.Join(dir, ProbesFile))
	if len(rows) != 2 {
		t.Errorf("probes.csv after the second run has %d rows, want 2", len(rows))
	}
	// The three files and the record of the set (the manifest of package outdir):
	// no temporary, staging or set-aside file is left.
	entries, _ := os.ReadDir(dir)
	if len(entries) != 4 {
		t.Errorf("output directory holds %d entries, want 4: %v", len(entries), entries)
	}
	if err := WriteRun(dir, nil, r, Summary{}); err == nil {
		t.Error("WriteRun with a nil case succeeded")
	}
}

// FuzzFieldsRoundTrip writes fields.csv with an arbitrary layer name and
// arbitrary values and reads it back with encoding/csv: the file must parse,
// keep the layer name, and give back each number rounded as documented.
func FuzzFieldsRoundTrip(f *testing.F) {
	f.Add("resin", 350.0, 0.5, 1e-4)
	f.Add(`a "quoted", name`, 273.15, 0.0, 0.0)
	f.Add("line\nbreak", -1.0, math.NaN(), math.Inf(1))
	f.Add(" lead", 1e300, 1.0, -1e-300)
	f.Fuzz(func(t *testing.T, name string, T, cure, rate float64) {
		c, r := testkit.HandBuiltCase(t), testkit.HandBuiltResult()
		c.Problem.Mesh.Layers[0].Name = name
		r.Snapshots = r.Snapshots[:1]
		s := &r.Snapshots[0]
		s.T[0], s.Cure[0], s.Rate[0] = T, cure, rate
		var b bytes.Buffer
		if err := writeFields(&b, c, r); err != nil {
			t.Fatal(err)
		}
		rows, err := csv.NewReader(&b).ReadAll()
		if err != nil {
			t.Fatalf("fields.csv does not parse: %v\n%s", err, b.String())
		}
		if len(rows) != 1+c.Problem.Mesh.Cells() {
			t.Fatalf("%d rows, want %d", len(rows), 1+c.Problem.Mesh.Cells())
		}
		// encoding/csv reads \r\n inside a quoted field as \n.
		if want := strings.ReplaceAll(name, "\r\n", "\n"); rows[1][2] != want && strings.ToValidUTF8(name, "") == name {
			t.Errorf("layer %q read back as %q", name, rows[1][2])
		}
		check := func(col int, v float64, tol float64) {
			got := rows[1][col]
			if math.IsNaN(v) {
				if got != "" {
					t.Errorf("column %d: NaN written as %q", col, got)
				}
				return
			}
			x, err := strconv.ParseFloat(got, 64)
			if err != nil {
				t.Errorf("column %d: %q: %v", col, got, err)
				return
			}
			if !(math.Abs(x-v) <= tol*max(1, math.Abs(v))) && !(math.IsInf(v, 0) && x == v) {
				t.Errorf("column %d: %g written as %q", col, v, got)
			}
		}
		check(3, T-273.15, 5e-7)
		check(4, cure, 5e-9)
		check(5, rate, 5e-9)
	})
}
