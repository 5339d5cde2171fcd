package calibrate

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"cureslab/cases"
	"cureslab/cases/internal/num"
)

// ErrLog is wrapped by every error about the measured log.
var ErrLog = errors.New("bad measured log")

// maxLogErrors bounds the errors reported for one log.
const maxLogErrors = 20

// Log is a measured temperature log: thermocouples at fixed depths read at
// common times. Temperatures in K, times in s, depths in m.
type Log struct {
	File   string
	Times  []float64 // strictly increasing
	Lines  []int     // the line of the file each time is on
	Probes []Probe   // in the order of the header
	// Dropped names the temperature columns that hold no reading at all;
	// they are left out of Probes.
	Dropped []string
}

// Probe is one thermocouple of a Log.
type Probe struct {
	Column    string    // the header as written, such as T_6mm_C
	Label     string    // the depth in mm as written in the header, such as 6
	Depth     float64   // m
	Line, Col int       // where its header is
	T         []float64 // K, one per time; NaN where the cell is empty
}

// Readings returns the number of temperatures the log holds.
func (l *Log) Readings() int {
	n := 0
	for _, p := range l.Probes {
		n += p.Readings()
	}
	return n
}

// Readings returns the number of temperatures the probe holds.
func (p *Probe) Readings() int {
	n := 0
	for _, v := range p.T {
		if !math.IsNaN(v) {
			n++
		}
	}
	return n
}

// logErrors collects the positioned errors of a log.
type logErrors struct {
	file string
	list cases.ErrorList
	more int
}

func (e *logErrors) add(line, col int, column, format string, a ...any) {
	if len(e.list) >= maxLogErrors {
		e.more++
		return
	}
	e.list = append(e.list, &cases.Error{File: e.file, Line: line, Col: col, Key: column,
		Err: cases.Reason(ErrLog, nil, fmt.Sprintf(format, a...))})
}

func (e *logErrors) err() error {
	if e.more > 0 {
		e.list = append(e.list, &cases.Error{File: e.file, Err: cases.Reason(ErrLog, nil, fmt.Sprintf("and %d more errors", e.more))})
	}
	return e.list.Err()
}

// exampleLog is the hint for a log whose header is not understood.
const exampleLog = `a log has the shape of probes.csv, for example:
time_s,T_0mm_C,T_6mm_C
0,23.1,23.0
60,23.4,23.1`

// ReadLog reads a measured log from data (name is used in messages): CSV
// with a header row holding a time_s column and T_<depth>mm_C columns, the
// shape of a run's probes.csv. Every other column is ignored; an empty cell
// is a missing reading; lines starting with # are comments; a UTF-8 byte
// order mark is skipped.
//
// Errors (all of them, each with file:line:col and the column, as a
// cases.ErrorList whose errors wrap ErrLog): no time_s column, no
// temperature column, two columns at the same depth, a cell that is not a
// number, a temperature below absolute zero, an empty or non-increasing
// time, a row with more or fewer cells than the header, no reading at all.
// Depths and times are checked against a case by Check.
func ReadLog(name string, data []byte) (*Log, error) {
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	r := csv.NewReader(bytes.NewReader(data))
	r.Comment = '#'
	r.FieldsPerRecord = -1
	r.TrimLeadingSpace = true
	lr := &logReader{r: r, errs: &logErrors{file: name}, log: &Log{File: name}}
	head, err := r.Read()
	if err == io.EOF {
		lr.errs.add(0, 0, "", "the file is empty\n%s", exampleLog)
		return nil, lr.errs.err()
	}
	if err != nil {
		return nil, csvError(name, err)
	}
	lr.header(append([]string(nil), head...))
	if len(lr.errs.list) > 0 {
		return nil, lr.errs.err()
	}
	for {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) && !errors.Is(pe.Err, csv.ErrFieldCount) {
				lr.errs.add(pe.Line, pe.Column, "", "%v", pe.Err)
				return nil, lr.errs.err()
			}
			return nil, csvError(name, err)
		}
		lr.row(rec)
	}
	if len(lr.errs.list) > 0 {
		return nil, lr.errs.err()
	}
	return lr.finish()
}

// logReader is the state of ReadLog between the rows of a log.
type logReader struct {
	r        *csv.Reader
	errs     *logErrors
	log      *Log
	width    int   // cells in the header
	timeCol  int   // column of time_s, −1 if none
	probeOf  []int // column -> index into log.Probes, −1 for none
	prevLine int   // line of the last time read
}

// header reads the header row head: the time_s column and the
// T_<depth>mm_C columns, each depth once.
func (lr *logReader) header(head []string) {
	l, errs := lr.log, lr.errs
	lr.width = len(head)
	lr.timeCol = -1
	lr.probeOf = make([]int, len(head))
	for i, h := range head {
		h = strings.TrimSpace(h)
		lr.probeOf[i] = -1
		line, col := lr.r.FieldPos(i)
		switch {
		case h == "time_s":
			if lr.timeCol >= 0 {
				errs.add(line, col, h, "a second time_s column (the first is column %d)", lr.timeCol+1)
				continue
			}
			lr.timeCol = i
		case strings.HasPrefix(h, "T_") && strings.HasSuffix(h, "mm_C") && len(h) > len("T_mm_C"):
			label := strings.TrimSuffix(strings.TrimPrefix(h, "T_"), "mm_C")
			z, err := strconv.ParseFloat(label, 64)
			if err != nil || math.IsNaN(z) || math.IsInf(z, 0) || z < 0 || strings.ContainsAny(label, "+eEnNiI_") {
				errs.add(line, col, h, "the depth %q is not a number of millimetres, such as T_6.35mm_C", label)
				continue
			}
			dup := false
			for _, p := range l.Probes {
				if p.Depth == z*1e-3 {
					errs.add(line, col, h, "a second column at depth %s mm (the first is %s)", label, p.Column)
					dup = true
				}
			}
			if dup {
				continue
			}
			lr.probeOf[i] = len(l.Probes)
			l.Probes = append(l.Probes, Probe{Column: h, Label: label, Depth: z * 1e-3, Line: line, Col: col})
		}
	}
	if lr.timeCol < 0 {
		errs.add(1, 1, "", "no time_s column (the header has %s)\n%s", quoteList(head), exampleLog)
	}
	if len(l.Probes) == 0 && len(errs.list) == 0 {
		errs.add(1, 1, "", "no temperature column T_<depth>mm_C (the header has %s)\n%s", quoteList(head), exampleLog)
	}
}

// row reads one data row rec: its time, which must come after the last
// one, and a temperature (°C, NaN for an empty cell) for every probe.
func (lr *logReader) row(rec []string) {
	l, errs := lr.log, lr.errs
	line, _ := lr.r.FieldPos(0)
	if len(rec) != lr.width {
		errs.add(line, 1, "", "%d cells, but the header has %d columns", len(rec), lr.width)
		return
	}
	tcell := strings.TrimSpace(rec[lr.timeCol])
	_, tc := lr.r.FieldPos(lr.timeCol)
	tm, err := strconv.ParseFloat(tcell, 64)
	switch {
	case tcell == "":
		errs.add(line, tc, "time_s", "the time is empty: every row needs its time in seconds")
		return
	case err != nil || math.IsNaN(tm) || math.IsInf(tm, 0):
		errs.add(line, tc, "time_s", "%q is not a time in seconds", tcell)
		return
	case len(l.Times) > 0 && !(tm > l.Times[len(l.Times)-1]):
		errs.add(line, tc, "time_s", "%s s does not come after %s s on line %d: times must increase", tcell,
			strconv.FormatFloat(l.Times[len(l.Times)-1], 'g', -1, 64), lr.prevLine)
		return
	}
	l.Times = append(l.Times, tm)
	l.Lines = append(l.Lines, line)
	lr.prevLine = line
	for i, k := range lr.probeOf {
		if k < 0 {
			continue
		}
		p := &l.Probes[k]
		cell := strings.TrimSpace(rec[i])
		if cell == "" {
			p.T = append(p.T, math.NaN())
			continue
		}
		v, err := strconv.ParseFloat(cell, 64)
		_, col := lr.r.FieldPos(i)
		switch {
		case err != nil || math.IsNaN(v) || math.IsInf(v, 0):
			errs.add(line, col, p.Column, "%q is not a temperature in °C (leave the cell empty for a missing reading)", cell)
			v = math.NaN()
		case v < -273.15:
			errs.add(line, col, p.Column, "%s °C is below absolute zero", cell)
			v = math.NaN()
		}
		p.T = append(p.T, v+273.15)
	}
}

// finish refuses a log with no data row, drops the probes with no reading
// (named in Dropped) and refuses a log left with none.
func (lr *logReader) finish() (*Log, error) {
	l, errs := lr.log, lr.errs
	if len(l.Times) == 0 {
		errs.add(0, 0, "", "no data rows after the header")
		return nil, errs.err()
	}
	kept := l.Probes[:0]
	for _, p := range l.Probes {
		if p.Readings() == 0 {
			l.Dropped = append(l.Dropped, p.Column)
			continue
		}
		kept = append(kept, p)
	}
	l.Probes = kept
	if len(l.Probes) == 0 {
		errs.add(1, 1, "", "no usable column: every temperature column (%s) is empty", strings.Join(l.Dropped, ", "))
		return nil, errs.err()
	}
	return l, nil
}

// Check refuses a log that the case cannot be compared with: a depth
// outside the stack (0 to thickness, m) or a time outside the run (0 to
// end, s). Errors as ReadLog's.
func (l *Log) Check(thickness, end float64) error {
	errs := &logErrors{file: l.File}
	for _, p := range l.Probes {
		if p.Depth > thickness*(1+1e-12) {
			errs.add(p.Line, p.Col, p.Column, "depth %s mm is outside the stack (0 to %s mm)", p.Label, num.FormatDepth(thickness))
		}
	}
	for i, t := range l.Times {
		switch {
		case t < 0:
			errs.add(l.Lines[i], 0, "time_s", "%s s is before the start of the run (0 s)", fmtNum(t))
		case t > end*(1+1e-12):
			errs.add(l.Lines[i], 0, "time_s", "%s s is after the end of the run at %s s%s: cut the log there, or set a later time.end in the case",
				fmtNum(t), fmtNum(end), laterRows(len(l.Times)-i-1))
		}
		if t > end*(1+1e-12) {
			break
		}
	}
	return errs.err()
}

func laterRows(n int) string {
	switch {
	case n <= 0:
		return ""
	case n == 1:
		return ", as is the row after it"
	}
	return fmt.Sprintf(", as are the %d rows after it", n)
}

func fmtNum(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

func quoteList(s []string) string {
	q := make([]string, len(s))
	for i, x := range s {
		q[i] = strconv.Quote(x)
	}
	return strings.Join(q, ", ")
}

// csvError turns a read error of encoding/csv into a positioned log error.
func csvError(name string, err error) error {
	e := &logErrors{file: name}
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		e.add(pe.Line, pe.Column, "", "%v", pe.Err)
	} else {
		e.add(0, 0, "", "%v", err)
	}
	return e.err()
}
