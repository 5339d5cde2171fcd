package calibrate

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestReadLog(t *testing.T) {
	src := "\xef\xbb\xbf# a comment line\n" +
		"time_s,T_0mm_C,cure_0mm,T_6.35mm_C,air_top_C,T_9mm_C\n" +
		"0,23,0,23.5,23,\n" +
		"60,24.5,0,,30,\n" +
		"# a note in the middle\n" +
		"120, 26 ,0,24,35,\n"
	l, err := ReadLog("log.csv", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	if len(l.Times) != 3 || l.Times[2] != 120 || l.Lines[2] != 6 {
		t.Errorf("times %v on lines %v", l.Times, l.Lines)
	}
	if len(l.Probes) != 2 || l.Probes[1].Depth != 6.35e-3 || l.Probes[1].Label != "6.35" {
		t.Fatalf("probes %+v", l.Probes)
	}
	if len(l.Dropped) != 1 || l.Dropped[0] != "T_9mm_C" {
		t.Errorf("dropped %v, want the empty T_9mm_C", l.Dropped)
	}
	// °C to K exactly as 273.15 is added (definition of the Celsius scale).
	if l.Probes[0].T[1] != 24.5+273.15 || !math.IsNaN(l.Probes[1].T[1]) || l.Probes[0].T[2] != 26+273.15 {
		t.Errorf("temperatures %v %v", l.Probes[0].T, l.Probes[1].T)
	}
	if n := l.Readings(); n != 5 {
		t.Errorf("%d readings, want 5", n)
	}
}

func TestReadLogRefuses(t *testing.T) {
	for _, c := range []struct {
		name, src string
		want      []string // substrings of the message, the position first
	}{
		{"empty", "", []string{"log.csv: the file is empty"}},
		{"no time", "t,T_1mm_C\n0,1\n", []string{"log.csv:1:1: no time_s column", `"t", "T_1mm_C"`}},
		{"no temperature", "time_s,air_C\n0,1\n", []string{"log.csv:1:1: no temperature column"}},
		{"all empty", "time_s,T_1mm_C\n0,\n60,\n", []string{"log.csv:1:1: no usable column", "T_1mm_C"}},
		{"bad depth", "time_s,T_xmm_C\n0,1\n", []string{"log.csv:1:8: T_xmm_C: the depth \"x\""}},
		{"same depth", "time_s,T_6mm_C,T_6.0mm_C\n0,1,2\n", []string{"log.csv:1:16: T_6.0mm_C: a second column at depth 6.0 mm (the first is T_6mm_C)"}},
		{"not increasing", "time_s,T_1mm_C\n0,20\n60,21\n60,22\n", []string{"log.csv:4:1: time_s: 60 s does not come after 60 s on line 3"}},
		{"going back", "time_s,T_1mm_C\n0,20\n60,21\n30,22\n", []string{"log.csv:4:1: time_s: 30 s does not come after 60 s on line 3"}},
		{"empty time", "time_s,T_1mm_C\n0,20\n,21\n", []string{"log.csv:3:1: time_s: the time is empty"}},
		{"bad number", "time_s,T_1mm_C\n0,20\n60,2l\n", []string{"log.csv:3:4: T_1mm_C: \"2l\" is not a temperature"}},
		{"below absolute zero", "time_s,T_1mm_C\n0,-300\n", []string{"log.csv:2:3: T_1mm_C: -300 °C is below absolute zero"}},
		{"ragged", "time_s,T_1mm_C\n0,20,5\n", []string{"log.csv:2:1: 3 cells, but the header has 2 columns"}},
		{"bad quote", "time_s,T_1mm_C\n0,\"20\n", []string{"log.csv:2:"}},
		{"header only", "time_s,T_1mm_C\n", []string{"log.csv: no data rows"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadLog("log.csv", []byte(c.src))
			if err == nil {
				t.Fatal("no error")
			}
			if !errors.Is(err, ErrLog) {
				t.Errorf("%v does not wrap ErrLog", err)
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("got %q, want it to contain %q", err, w)
				}
			}
		})
	}
}

func TestLogCheck(t *testing.T) {
	l, err := ReadLog("log.csv", []byte("time_s,T_2mm_C,T_20mm_C\n-5,20,20\n0,20,20\n100,21,21\n200,22,22\n300,23,23\n"))
	if err != nil {
		t.Fatal(err)
	}
	err = l.Check(10e-3, 150)
	for _, w := range []string{
		"log.csv:1:16: T_20mm_C: depth 20 mm is outside the stack (0 to 10 mm)",
		"log.csv:2: time_s: -5 s is before the start of the run (0 s)",
		"log.csv:5: time_s: 200 s is after the end of the run at 150 s, as is the row after it",
	} {
		if err == nil || !strings.Contains(err.Error(), w) {
			t.Errorf("got %v, want it to contain %q", err, w)
		}
	}
	if err := l.Check(20e-3, 300); err == nil || strings.Contains(err.Error(), "depth") {
		t.Errorf("only the time before 0 is wrong: %v", err)
	}
}
