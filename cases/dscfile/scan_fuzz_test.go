package dscfile

import (
	"bytes"
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/testkit"
	"cureslab/physics/dsc"
	"errors"
	"fmt"
	"math"
	"reflect"
	"strconv"
	"strings"
	"testing"
)

// fzScanOracle reads a DSC scan independently of encoding/csv, for the
// simple texts it understands (as fzLogOracle). It returns the samples in
// SI (s, K, W/kg) or the 1-based line of the first problem (0 for an empty
// file).
func fzScanOracle(data []byte) (tm, temp, flow []float64, badLine int, simple bool) {
	text := strings.TrimPrefix(string(data), "\xef\xbb\xbf")
	if strings.Contains(text, "\"") {
		return nil, nil, nil, 0, false
	}
	lines := strings.Split(text, "\n")
	for i := range lines {
		lines[i] = strings.TrimSuffix(lines[i], "\r")
		if strings.Contains(lines[i], "\r") || lines[i] != "" && strings.TrimSpace(lines[i]) == "" {
			return nil, nil, nil, 0, false
		}
	}
	col := map[string]int{}
	header, last := true, 0
	for i, ln := range lines {
		if ln == "" || ln[0] == '#' {
			continue
		}
		last = i + 1
		fields := strings.Split(ln, ",")
		if header {
			for k, f := range fields {
				f = strings.TrimSpace(f)
				_, dup := col[f]
				known := false
				for _, h := range scanColumns {
					known = known || f == h
				}
				if !known || dup {
					return nil, nil, nil, i + 1, true
				}
				col[f] = k
			}
			if len(col) != len(scanColumns) {
				return nil, nil, nil, i + 1, true
			}
			header = false
			continue
		}
		if len(fields) != len(scanColumns) {
			return nil, nil, nil, i + 1, true
		}
		var v [3]float64
		for k, h := range scanColumns {
			x, err := strconv.ParseFloat(strings.TrimSpace(fields[col[h]]), 64)
			if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
				return nil, nil, nil, i + 1, true
			}
			v[k] = x
		}
		// Source: NIST SP 811 (2008), §4.2.1.1: T/K = t/°C + 273.15; 1 W/g = 1000 W/kg (from memory).
		T := v[1] + 273.15
		if len(tm) > 0 && !(v[0] > tm[len(tm)-1]) || !(T > 0) {
			return nil, nil, nil, i + 1, true
		}
		tm, temp, flow = append(tm, v[0]), append(temp, T), append(flow, v[2]*1000)
	}
	if header && len(col) == 0 {
		return nil, nil, nil, 0, true
	}
	if len(tm) < dsc.MinPoints {
		return nil, nil, nil, last, true
	}
	return tm, temp, flow, 0, true
}

// FuzzScanCSV feeds any bytes to parseScan as a DSC scan file.
// Properties: no panic; a rejection is an ErrorList of *Error wrapping
// ErrScan in the scan's file, each on a line of it (≥ 1) except the error
// of an empty file and the "more errors" line; an accepted scan has at
// least dsc.MinPoints samples of equal count, finite, with increasing times
// and positive temperatures; for the texts fzScanOracle understands, the
// reader accepts exactly when the oracle does, reports its first problem
// on the same line and returns the same samples; and an accepted scan
// written back by writeScan reads back to the same samples within
// writeScan's rounding (when its times are more than 1 ms apart, so that
// rounding keeps them increasing, and its temperatures above 1 K).
func FuzzScanCSV(f *testing.F) {
	var b strings.Builder
	b.WriteString("# scan at 10 K/min\ntime_s,temperature_C,heat_flow_W_per_g\n")
	for i := 0; i < 25; i++ {
		fmt.Fprintf(&b, "%d,%g,%g\n", 6*i, 30+float64(i), 0.01*float64(i%7))
	}
	good := b.String()
	for _, s := range []string{
		good,
		strings.Replace(good, "time_s,temperature_C,heat_flow_W_per_g", "heat_flow_W_per_g, time_s, temperature_C", 1),
		strings.Replace(good, "\n", "\r\n", -1),
		"\xef\xbb\xbf" + good,
		strings.Replace(good, "12,32,0.02", "12,32,x", 1),
		strings.Replace(good, "12,32,0.02", "6,32,0.02", 1),
		strings.Replace(good, "12,32,0.02", "12,-300,0.02", 1),
		"time_s,temperature_C\n0,20\n",
		"time_s,temperature_C,heat_flow_W_per_g,extra\n",
		"time_s,time_s,heat_flow_W_per_g\n",
		"0,25,0.1\n1,26,0.1\n",
		"time_s,temperature_C,heat_flow_W_per_g\n0,25,0.1\n",
		"",
		"# only a comment\n",
		"time_s,temperature_C,heat_flow_W_per_g\n0,\"2\n5\",0.1\n",
	} {
		f.Add([]byte(s))
	}
	testkit.SeedFiles(f, "../../testdata/*/*.csv")
	f.Fuzz(func(t *testing.T, data []byte) {
		defer testkit.Watchdog(testkit.HangLimit, data)()
		s, err := parseScan(context.Background(), "scan.csv", data)
		tm, temp, flow, bad, simple := fzScanOracle(data)
		if err != nil {
			var list cases.ErrorList
			if !errors.As(err, &list) || len(list) == 0 {
				t.Fatalf("error %T is not a non-empty ErrorList: %v", err, err)
			}
			lines := testkit.LineCount(data)
			for i, e := range list {
				if e == nil || e.File != "scan.csv" || !errors.Is(e, ErrScan) || strings.TrimSpace(e.Err.Error()) == "" {
					t.Fatalf("error %d: %#v", i, e)
				}
				more := i == len(list)-1 && strings.Contains(e.Err.Error(), "more errors")
				empty := strings.Contains(e.Err.Error(), "empty")
				if e.Line < 0 || e.Line > lines || e.Line == 0 && !more && !empty {
					t.Errorf("error on line %d of %d: %v", e.Line, lines, e)
				}
			}
			if simple && bad == 0 && tm != nil {
				t.Fatalf("reader rejects a scan the oracle reads (%d samples): %v", len(tm), err)
			}
			if simple && list[0].Line != bad {
				t.Fatalf("first error on line %d, oracle says line %d: %v", list[0].Line, bad, err)
			}
			return
		}
		n := len(s.Time)
		if n < dsc.MinPoints || len(s.Temp) != n || len(s.HeatFlow) != n {
			t.Fatalf("accepted scan with %d/%d/%d samples", n, len(s.Temp), len(s.HeatFlow))
		}
		minGap := math.Inf(1)
		for i := range s.Time {
			if math.IsInf(s.Time[i], 0) || !(s.Temp[i] > 0) || math.IsInf(s.Temp[i], 0) || math.IsNaN(s.HeatFlow[i]) || math.IsInf(s.HeatFlow[i], 0) ||
				i > 0 && !(s.Time[i] > s.Time[i-1]) {
				t.Fatalf("accepted sample %d: %g s, %g K, %g W/kg", i, s.Time[i], s.Temp[i], s.HeatFlow[i])
			}
			if i > 0 {
				minGap = min(minGap, s.Time[i]-s.Time[i-1])
			}
		}
		if simple {
			if bad > 0 || tm == nil {
				t.Fatalf("reader accepts a scan the oracle rejects on line %d", bad)
			}
			if !reflect.DeepEqual(s.Time, tm) || !reflect.DeepEqual(s.Temp, temp) || !reflect.DeepEqual(s.HeatFlow, flow) {
				t.Fatalf("samples differ from the oracle's")
			}
		}
		// Round trip through writeScan.
		minT := math.Inf(1)
		for _, T := range s.Temp {
			minT = min(minT, T)
		}
		if !(minGap > 1e-3) || !(minT > 1) {
			return
		}
		var buf bytes.Buffer
		if err := writeScan(&buf, s, "round trip\nof a fuzzed scan"); err != nil {
			t.Fatal(err)
		}
		s2, err := parseScan(context.Background(), "scan2.csv", buf.Bytes())
		if err != nil {
			t.Fatalf("writeScan output does not read back: %v\n%s", err, buf.String())
		}
		if len(s2.Time) != n {
			t.Fatalf("%d samples read back, %d written", len(s2.Time), n)
		}
		ulps := func(x float64) float64 { return 8 * math.Abs(x) * 0x1p-52 }
		for i := range n {
			// writeScan rounds time to 1e-3 s, temperature to 1e-4 °C and heat
			// flow to 1e-6 W/g (its doc comment): half of each, plus round-off.
			if math.Abs(s2.Time[i]-s.Time[i]) > 5e-4+ulps(s.Time[i]) ||
				math.Abs(s2.Temp[i]-s.Temp[i]) > 5e-5+ulps(max(s.Temp[i], 273.15)) ||
				math.Abs(s2.HeatFlow[i]-s.HeatFlow[i]) > 5e-4+ulps(s.HeatFlow[i])*1000 {
				t.Fatalf("sample %d: wrote %g s, %g K, %g W/kg; read back %g s, %g K, %g W/kg",
					i, s.Time[i], s.Temp[i], s.HeatFlow[i], s2.Time[i], s2.Temp[i], s2.HeatFlow[i])
			}
		}
	})
}
