package journal

import (
	"bytes"
	"encoding/csv"
	"errors"
	"slices"
	"strconv"
	"strings"
	"testing"
)

var columns = []string{"run", "layer.a.thickness", "peak_temperature_C", "status", "error"}

// sample returns a journal of n runs as encoding/csv writes it; run 5 has a
// multi-line error with quotes and commas.
func sample(n int) []byte {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	w.Write(headerFor(columns))
	for r := range n {
		errText := ""
		if r == 5 {
			errText = "case.toml:3:1: \"x\", bad\nsecond line"
		}
		w.Write(Record([]string{strconv.Itoa(r), strconv.Itoa(4+r) + " mm", "123." + strconv.Itoa(r), "ok", errText}))
	}
	w.Flush()
	return b.Bytes()
}

func TestReadSound(t *testing.T) {
	c, err := Read("journal.csv", sample(600), columns, 600)
	if err != nil || len(c.Rows) != 600 || len(c.Damaged) != 0 || c.Records != 600 {
		t.Fatalf("%v: %d rows, %d damaged, %d records", err, len(c.Rows), len(c.Damaged), c.Records)
	}
	if got := c.Rows[5][4]; got != "case.toml:3:1: \"x\", bad\nsecond line" {
		t.Errorf("run 5's error read back as %q", got)
	}
}

// replaceLine returns data with line (1-based) changed by f.
func replaceLine(data []byte, line int, f func(string) string) []byte {
	lines := strings.SplitAfter(string(data), "\n")
	lines[line-1] = f(lines[line-1])
	return []byte(strings.Join(lines, ""))
}

// One damaged record costs that run only: every later record that checks
// is kept, and the damage names the record, its line and its run.
func TestReadKeepsRecordsAfterDamage(t *testing.T) {
	for name, damage := range map[string]func(string) string{
		"a changed digit": func(s string) string { return strings.Replace(s, "123.", "124.", 1) },
		"a stray quote":   func(s string) string { return strings.Replace(s, "mm", "m\"m", 1) },
		"an open quote":   func(s string) string { return strings.Replace(s, ",ok,", ",\"ok,", 1) },
		"a lost comma":    func(s string) string { return strings.Replace(s, ",ok", "ok", 1) },
	} {
		// Line 40 is record 38 (the header is line 1; run 5 takes two lines), run 37.
		c, err := Read("journal.csv", replaceLine(sample(600), 40, damage), columns, 600)
		if err != nil {
			t.Fatal(err)
		}
		want := Damage{Record: 38, Line: 40, Run: 37}
		if len(c.Rows) != 599 || len(c.Damaged) != 1 || c.Damaged[0].Record != want.Record || c.Damaged[0].Line != want.Line ||
			c.Damaged[0].Run != want.Run || c.Damaged[0].Tail {
			t.Errorf("%s: %d rows, damage %v; want 599 rows and %v", name, len(c.Rows), c.Damaged, want)
		}
		if !slices.Equal(c.Runs(), []int{37}) {
			t.Errorf("%s: runs to redo %v, want [37]", name, c.Runs())
		}
	}
}

// A run done again after damage is appended later: its new record makes
// the damage good.
func TestRunsRedoneAreMadeGood(t *testing.T) {
	data := replaceLine(sample(10), 4, func(s string) string { return strings.Replace(s, "123.", "9", 1) })
	data = append(data, []byte(csvLine(Record([]string{"2", "6 mm", "123.2", "ok", ""}))+"\n")...)
	c, err := Read("journal.csv", data, columns, 10)
	if err != nil || len(c.Rows) != 10 || len(c.Damaged) != 1 || len(c.Runs()) != 0 {
		t.Errorf("%v: %d rows, damage %v, runs to redo %v", err, len(c.Rows), c.Damaged, c.Runs())
	}
}

func TestReadTornTail(t *testing.T) {
	data := sample(10)
	data = data[:len(data)-7]
	c, err := Read("journal.csv", data, columns, 10)
	if err != nil || len(c.Rows) != 9 || len(c.Damaged) != 1 || !c.Damaged[0].Tail || c.Damaged[0].Run != 9 {
		t.Errorf("%v: %d rows, damage %v", err, len(c.Rows), c.Damaged)
	}
	// Cut just before the last line end: the record is whole.
	data = sample(10)
	c, err = Read("journal.csv", data[:len(data)-1], columns, 10)
	if err != nil || len(c.Rows) != 10 || len(c.Damaged) != 0 {
		t.Errorf("without the last line end: %v: %d rows, damage %v", err, len(c.Rows), c.Damaged)
	}
}

// A damaged header says how to recover, with the header to put back; a
// journal of other columns says so.
func TestReadHeader(t *testing.T) {
	data := replaceLine(sample(20), 1, func(s string) string { return strings.Replace(s, "thickness", "thick\x00ess", 1) })
	_, err := Read("out/journal.csv", data, columns, 20)
	var he *HeaderError
	if !errors.As(err, &he) || he.Good != 20 || !strings.Contains(err.Error(), "replace the first line") ||
		!strings.Contains(err.Error(), "run,layer.a.thickness,peak_temperature_C,status,error,crc32") {
		t.Errorf("damaged header: %v", err)
	}
	_, err = Read("out/journal.csv", sample(20), []string{"run", "top.h", "status", "error"}, 20)
	if !errors.As(err, &he) || he.Good != 0 || !strings.Contains(err.Error(), "another version") {
		t.Errorf("other columns: %v", err)
	}
}
