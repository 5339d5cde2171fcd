package calibrate

import (
	"errors"
	"math"
	"testing"

	"cureslab/cases"
)

// FuzzReadLog: any input gives either a log that keeps its promises (times
// strictly increasing and finite, one line per time, at least one probe,
// each with a finite depth ≥ 0, one temperature per time, finite and above
// absolute zero or NaN for missing, at least one reading) or an error list
// whose errors wrap ErrLog and carry the file name; never a panic.
func FuzzReadLog(f *testing.F) {
	for _, s := range []string{
		"time_s,T_0mm_C,T_6.35mm_C\n0,23,23.5\n60,24.5,\n",
		"# comment\ntime_s,cure_0mm,T_1mm_C\n0,0,20\n",
		"\xef\xbb\xbftime_s,T_2mm_C\n0,20\n60,19\n",
		"time_s,T_1mm_C\n0,20\n60,21\n30,22\n",
		"time_s,T_xmm_C\n0,1\n",
		"time_s,T_1mm_C,T_1.0mm_C\n0,1,2\n",
		"time_s,T_1mm_C\n0,\"20\n",
		"time_s,T_1mm_C\n0,-300\n",
		"",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		l, err := ReadLog("log.csv", data)
		if err != nil {
			var list cases.ErrorList
			if !errors.As(err, &list) || len(list) == 0 {
				t.Fatalf("error %v is not a non-empty ErrorList", err)
			}
			for _, e := range list {
				if !errors.Is(e, ErrLog) || e.File != "log.csv" {
					t.Fatalf("error %v does not wrap ErrLog with the file name", e)
				}
			}
			return
		}
		if len(l.Times) == 0 || len(l.Lines) != len(l.Times) || len(l.Probes) == 0 || l.Readings() == 0 {
			t.Fatalf("accepted an empty log: %+v", l)
		}
		for i, tm := range l.Times {
			if math.IsNaN(tm) || math.IsInf(tm, 0) || (i > 0 && !(tm > l.Times[i-1])) {
				t.Fatalf("times %v", l.Times)
			}
		}
		for _, p := range l.Probes {
			if !(p.Depth >= 0) || math.IsInf(p.Depth, 0) || len(p.T) != len(l.Times) {
				t.Fatalf("probe %+v", p)
			}
			for _, v := range p.T {
				if !math.IsNaN(v) && (math.IsInf(v, 0) || v < 0) {
					t.Fatalf("temperature %g K in %s", v, p.Column)
				}
			}
		}
	})
}
