package dscfile

import (
	"bytes"
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/limits"
	"cureslab/physics/dsc"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// ErrScan is the sentinel of every problem in a DSC scan file.
var ErrScan = errors.New("bad DSC scan")

// scanColumns is the header row of a DSC scan file (README, Case file reference): time in s,
// sample temperature in °C, heat flow in W/g, exothermic positive.
var scanColumns = []string{"time_s", "temperature_C", "heat_flow_W_per_g"}

// maxScanSize is the largest DSC scan file ReadScan reads, in bytes
// (256 MB, some eight million rows of an instrument's export).
const maxScanSize = 256 << 20

// ReadScan reads the DSC scan file at path (see parseScan): a regular file
// of at most 256 MB, read in chunks with ctx checked between them
// (limits.ReadFile), and parsed with ctx checked every few thousand rows.
// When ctx is done the error is ctx.Err(), unwrapped.
func ReadScan(ctx context.Context, path string) (*dsc.Scan, error) {
	data, err := limits.ReadFile(ctx, path, maxScanSize)
	if err != nil {
		if ctx.Err() != nil && errors.Is(err, ctx.Err()) {
			return nil, ctx.Err()
		}
		return nil, cases.ErrorList{{File: path, Err: cases.Reason(ErrScan, err, fmt.Sprintf("cannot read the scan: %v", err))}}
	}
	return parseScan(ctx, path, data)
}

// scanCheckRows is how many rows parseScan reads between two checks of
// its context.
const scanCheckRows = 4096

// parseScan reads a DSC scan given as CSV text; name is the file name used
// in messages and as the scan's name.
//
// Format: a header row naming the three columns of scanColumns, in any
// order and nothing else, then one row per sample; lines starting with #
// are comments; a UTF-8 byte-order mark is skipped. Values are converted to
// SI: °C + 273.15 → K, W/g × 1000 → W/kg.
//
// Every problem is reported with its line and column (at most 10, then a
// count): a missing or unknown column, a row with the wrong number of
// fields, a value that is not a finite number, a time that does not
// increase, a temperature below absolute zero, fewer than dsc.MinPoints
// rows. The error is an ErrorList of *Error wrapping ErrScan.
// Cost: linear in the size of the file.
//
// Interruption: ctx is checked every scanCheckRows rows; once it is done
// parseScan returns ctx.Err().
func parseScan(ctx context.Context, name string, data []byte) (*dsc.Scan, error) {
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	var errs cases.ErrorList
	n := 0
	fail := func(line, col int, key string, cause error, format string, a ...any) {
		if n < cases.MaxFileErrors {
			errs = append(errs, &cases.Error{File: name, Line: line, Col: col, Key: key,
				Err: cases.Reason(ErrScan, cause, fmt.Sprintf(format, a...))})
		}
		n++
	}
	r := csv.NewReader(bytes.NewReader(data))
	r.FieldsPerRecord = -1
	r.TrimLeadingSpace = true
	r.Comment = '#'
	s := &dsc.Scan{Name: name}
	col := map[string]int{} // column name → field index
	lastLine := 0
	for row := 0; ; row++ {
		if row%scanCheckRows == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
		rec, err := r.Read()
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				fail(pe.Line, pe.Column, "", err, "%v", pe.Err)
			} else if !errors.Is(err, io.EOF) {
				fail(0, 0, "", err, "%v", err)
			}
			break
		}
		line, _ := r.FieldPos(0)
		lastLine = line
		if row == 0 {
			if !scanHeader(rec, col, func(c int, format string, a ...any) { fail(line, c, "", nil, format, a...) }) {
				break
			}
			continue
		}
		if len(rec) != len(scanColumns) {
			fail(line, 1, "", nil, "a row has %d fields (%s), this one has %d", len(scanColumns), strings.Join(headerOrder(col), ","), len(rec))
			continue
		}
		var v [3]float64
		good := true
		for k, key := range scanColumns {
			i := col[key]
			x, err := strconv.ParseFloat(strings.TrimSpace(rec[i]), 64)
			if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
				_, c := r.FieldPos(i)
				fail(line, c, key, nil, "%q is not a finite number", rec[i])
				good = false
			}
			v[k] = x
		}
		if !good {
			continue
		}
		t, T, q := v[0], v[1]+273.15, v[2]*1000
		switch {
		case len(s.Time) > 0 && !(t > s.Time[len(s.Time)-1]):
			_, c := r.FieldPos(col["time_s"])
			fail(line, c, "time_s", nil, "time must increase from row to row: %g s does not come after %g s", t, s.Time[len(s.Time)-1])
		case !(T > 0):
			_, c := r.FieldPos(col["temperature_C"])
			fail(line, c, "temperature_C", nil, "%g C is below absolute zero", v[1])
		default:
			s.Time = append(s.Time, t)
			s.Temp = append(s.Temp, T)
			s.HeatFlow = append(s.HeatFlow, q)
		}
	}
	if n == 0 && len(col) == 0 {
		fail(0, 0, "", nil, "the file is empty: a scan starts with the header %s", strings.Join(scanColumns, ","))
	}
	if n == 0 && len(col) > 0 && len(s.Time) < dsc.MinPoints {
		fail(lastLine, 0, "", nil, "the scan has %d data rows; at least %d are needed", len(s.Time), dsc.MinPoints)
	}
	if n > cases.MaxFileErrors {
		errs = append(errs, &cases.Error{File: name, Err: cases.Reason(ErrScan, nil, fmt.Sprintf("%d more errors in this file not shown", n-cases.MaxFileErrors))})
	}
	if n > 0 {
		return nil, errs
	}
	return s, nil
}

// scanHeader reads the header row rec into col, reporting problems through
// fail (with the column of the field); false if the header is unusable.
func scanHeader(rec []string, col map[string]int, fail func(c int, format string, a ...any)) bool {
	want := strings.Join(scanColumns, ",")
	if len(rec) > 0 {
		if _, err := strconv.ParseFloat(strings.TrimSpace(rec[0]), 64); err == nil {
			fail(1, "the first line must be the header %s, not data", want)
			return false
		}
	}
	ok := true
	for i, f := range rec {
		f = strings.TrimSpace(f)
		known := false
		for _, h := range scanColumns {
			if f == h {
				known = true
			}
		}
		switch _, dup := col[f]; {
		case !known:
			msg := fmt.Sprintf("unknown column %q", f)
			if g := cases.Suggest(f, scanColumns); g != "" {
				msg += fmt.Sprintf("; did you mean %q?", g)
			}
			fail(i+1, "%s (the columns are %s)", msg, want)
			ok = false
		case dup:
			fail(i+1, "column %q appears twice", f)
			ok = false
		default:
			col[f] = i
		}
	}
	if !ok {
		return false
	}
	var missing []string
	for _, h := range scanColumns {
		if _, ok := col[h]; !ok {
			missing = append(missing, h)
		}
	}
	if len(missing) > 0 {
		fail(1, "missing column %s (the header must be %s; heat flow in W/g, exothermic positive)", strings.Join(missing, ", "), want)
		return false
	}
	return true
}

// headerOrder returns the column names in file order.
func headerOrder(col map[string]int) []string {
	out := make([]string, len(col))
	for k, i := range col {
		if i < len(out) {
			out[i] = k
		}
	}
	return out
}

// writeScan writes s as a DSC scan file (the format parseScan reads):
// comment lines first (each line of comment prefixed with "# "), then the
// header and the rows, time in s to 1e-3, temperature in °C to 1e-4 and
// heat flow in W/g to 1e-6.
func writeScan(w io.Writer, s *dsc.Scan, comment string) error {
	var b strings.Builder
	for _, line := range strings.Split(strings.TrimRight(comment, "\n"), "\n") {
		if comment != "" {
			b.WriteString("# " + line + "\n")
		}
	}
	b.WriteString(strings.Join(scanColumns, ",") + "\n")
	for i := range s.Time {
		b.WriteString(strconv.FormatFloat(num.Round(s.Time[i], 3), 'f', -1, 64))
		b.WriteByte(',')
		b.WriteString(strconv.FormatFloat(num.Round(s.Temp[i]-273.15, 4), 'f', -1, 64))
		b.WriteByte(',')
		b.WriteString(strconv.FormatFloat(num.Round(s.HeatFlow[i]/1000, 6), 'f', -1, 64))
		b.WriteByte('\n')
	}
	_, err := io.WriteString(w, b.String())
	return err
}
