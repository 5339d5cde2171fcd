package report

import (
	"bufio"
	"bytes"
	"context"
	"cureslab/cases"
	"cureslab/cases/limits"
	"cureslab/cases/results"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
)

// ErrOutputFile is wrapped by the errors of RedrawReport for an output file
// of a run (fields.csv, probes.csv, summary.json) that is not as WriteRun
// writes it.
var ErrOutputFile = errors.New("malformed output file")

// outputError returns a positioned *Error about an output file.
func outputError(file string, line, col int, key, format string, a ...any) *cases.Error {
	return &cases.Error{File: file, Line: line, Col: col, Key: key,
		Err: cases.Reason(ErrOutputFile, nil, fmt.Sprintf(format, a...))}
}

// readRunData reads the output files of a run in dir into report data.
// Once ctx is done the reading stops (within 64 kB) and the error is
// ctx.Err().
func readRunData(ctx context.Context, dir string) (*runData, error) {
	tb := &runTable{}
	fields := filepath.Join(dir, results.FieldsFile)
	f, err := openOutput(fields) // a directory without it is said to be no run's first
	if err != nil {
		return nil, err
	}
	f.Close()
	// The summary before the fields: the gel points it records give the
	// gel times, followed as fields.csv is read.
	if err := readSummaryJSON(filepath.Join(dir, results.SummaryFile), tb); err != nil {
		return nil, err
	}
	if err := readFieldsCSV(ctx, fields, tb); err != nil {
		return nil, err
	}
	if err := readProbesCSV(ctx, filepath.Join(dir, results.ProbesFile), tb); err != nil {
		return nil, err
	}
	d, err := newRunData(tb, "")
	if err != nil {
		return nil, &cases.Error{File: fields, Err: cases.Reason(ErrOutputFile, nil, err.Error())}
	}
	return d, nil
}

// openOutput opens an output file of a run, with a message that says what
// is expected when it is missing. A path that is not a regular file (a
// FIFO, a device) is refused at once (limits.Open), not waited on.
func openOutput(path string) (*os.File, error) {
	f, err := limits.Open(path, math.MaxInt64)
	if err != nil {
		msg := fmt.Sprintf("cannot read the output file: %v", err)
		if errors.Is(err, os.ErrNotExist) {
			msg = "missing: the directory does not hold the outputs of a run"
		}
		return nil, &cases.Error{File: path, Err: cases.Reason(cases.ErrFile, err, msg),
			Hint: "give the output directory of 'cureslab run' (it holds fields.csv, probes.csv and summary.json)"}
	}
	return f, nil
}

// csvTable reads a CSV output file record by record with positioned errors.
type csvTable struct {
	ctx  context.Context
	path string
	r    *csv.Reader
	line int // line of the record last read
}

// newCSVTable reads f in blocks of 64 kB, checking ctx before each.
func newCSVTable(ctx context.Context, path string, f io.Reader) *csvTable {
	r := csv.NewReader(bufio.NewReaderSize(limits.Reader(ctx, f), 64<<10))
	r.ReuseRecord = true
	return &csvTable{ctx: ctx, path: path, r: r}
}

// next returns the next record, io.EOF at the end, ctx.Err() once the
// context is done, or a positioned error.
func (t *csvTable) next() ([]string, error) {
	rec, err := t.r.Read()
	if err == io.EOF {
		return nil, err
	}
	if err != nil && t.ctx.Err() != nil {
		return nil, t.ctx.Err()
	}
	if err != nil {
		var pe *csv.ParseError
		if errors.As(err, &pe) {
			return nil, outputError(t.path, pe.Line, pe.Column, "", "%v", pe.Err)
		}
		return nil, &cases.Error{File: t.path, Err: cases.Reason(cases.ErrFile, err, err.Error())}
	}
	t.line, _ = t.r.FieldPos(0)
	return rec, nil
}

// number parses field i of rec; empty gives NaN when blank is allowed.
func (t *csvTable) number(rec []string, i int, col string, blank bool) (float64, error) {
	s := rec[i]
	if s == "" && blank {
		return math.NaN(), nil
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
		line, c := t.r.FieldPos(i)
		what := fmt.Sprintf("%q is not a number", s)
		if s == "" {
			what = "empty, want a number"
		}
		return 0, outputError(t.path, line, c, col, "%s", what)
	}
	return v, nil
}

func (t *csvTable) errAt(i int, col, format string, a ...any) *cases.Error {
	line, c := t.r.FieldPos(i)
	return outputError(t.path, line, c, col, format, a...)
}

// readFieldsCSV reads fields.csv (README, Case file reference): one block of rows per output
// time, the same cells in the same order in every block. The blocks go one
// by one into tb.Fields (fieldColumns), which keeps a bounded set of them:
// memory O(cells), however long the file.
func readFieldsCSV(ctx context.Context, path string, tb *runTable) error {
	f, err := openOutput(path)
	if err != nil {
		return err
	}
	defer f.Close()
	fr := &fieldsReader{t: newCSVTable(ctx, path, f), tb: tb}
	if err := fr.header(); err != nil {
		return err
	}
	for {
		rec, err := fr.t.next()
		if err == io.EOF {
			break
		}
		if err != nil {
			return err
		}
		if err := fr.row(rec); err != nil {
			return err
		}
	}
	if len(tb.Times) == 0 {
		return outputError(path, 2, 0, "", "no data rows after the header")
	}
	if fr.cell != len(tb.Centers) {
		return outputError(path, fr.t.line, 0, "", "the last output time has %d cells, want %d (the file is cut short)", fr.cell, len(tb.Centers))
	}
	fr.flush()
	return nil
}

// fieldsReader is the state of readFieldsCSV: the cells of the first
// output time are gathered in first (they set the cells every later time
// must list); every later output time fills a column of tb.Fields
// (fieldColumns), handed over once complete.
type fieldsReader struct {
	t                   *csvTable
	tb                  *runTable
	iT, iZ, iL, iTC, iA int // columns: time, depth, layer, temperature, cure
	iP                  int // column of the absorbed power, when withPower
	withPower           bool
	first               fieldCol
	cur                 *fieldCol
	cell                int // index of the cell in the current block
}

// header reads the header row: every column of results.FieldsHeader must
// be there; the absorbed power is optional.
func (fr *fieldsReader) header() error {
	path := fr.t.path
	head, err := fr.t.next()
	if err == io.EOF {
		return outputError(path, 1, 0, "", "empty file, want the header %s", strings.Join(results.FieldsHeader, ","))
	}
	if err != nil {
		return err
	}
	col := map[string]int{}
	for i, h := range head {
		col[h] = i
	}
	for _, h := range results.FieldsHeader {
		if _, ok := col[h]; !ok {
			return outputError(path, 1, 0, "", "no column %q in the header, want %s", h, strings.Join(results.FieldsHeader, ","))
		}
	}
	fr.iT, fr.iZ, fr.iL, fr.iTC, fr.iA = col["time_s"], col["depth_mm"], col["layer"], col["temperature_C"], col["cure"]
	fr.iP, fr.withPower = col[results.PowerColumn]
	return nil
}

// flush hands the block just read to tb.Fields.
func (fr *fieldsReader) flush() {
	tb := fr.tb
	if tb.Fields == nil {
		tb.newFields(fr.withPower)
		c := tb.Fields.column()
		copy(c.T, fr.first.T)
		copy(c.Cure, fr.first.Cure)
		copy(c.P, fr.first.P)
		fr.first = fieldCol{}
		tb.Fields.add(tb.Times[0], c)
		return
	}
	tb.Fields.add(tb.Times[len(tb.Times)-1], fr.cur)
}

// row reads one data row: its time (a new output time starts a block),
// its cell (checked against the first block) and its values.
func (fr *fieldsReader) row(rec []string) error {
	t, tb := fr.t, fr.tb
	tm, err := t.number(rec, fr.iT, "time_s", false)
	if err != nil {
		return err
	}
	z, err := t.number(rec, fr.iZ, "depth_mm", false)
	if err != nil {
		return err
	}
	T, err := t.number(rec, fr.iTC, "temperature_C", false)
	if err != nil {
		return err
	}
	a, err := t.number(rec, fr.iA, "cure", true)
	if err != nil {
		return err
	}
	if nt := len(tb.Times); nt == 0 || tm != tb.Times[nt-1] {
		if err := fr.startTime(rec, tm); err != nil {
			return err
		}
	}
	if err := fr.placeCell(rec, z); err != nil {
		return err
	}
	P := 0.0
	if fr.withPower {
		if P, err = t.number(rec, fr.iP, results.PowerColumn, false); err != nil {
			return err
		}
	}
	if len(tb.Times) == 1 {
		fr.first.T = append(fr.first.T, T)
		fr.first.Cure = append(fr.first.Cure, a)
		if fr.withPower {
			fr.first.P = append(fr.first.P, P)
		}
	} else {
		fr.cur.T[fr.cell], fr.cur.Cure[fr.cell] = T, a
		if fr.withPower {
			fr.cur.P[fr.cell] = P
		}
	}
	fr.cell++
	return nil
}

// startTime starts the block of the output time tm: times must increase,
// and the block before must have listed every cell.
func (fr *fieldsReader) startTime(rec []string, tm float64) error {
	t, tb := fr.t, fr.tb
	if nt := len(tb.Times); nt > 0 {
		if !(tm > tb.Times[nt-1]) {
			return t.errAt(fr.iT, "time_s", "%s s after %s s: output times must increase", rec[fr.iT], fmtG(tb.Times[nt-1]))
		}
		if fr.cell != len(tb.Centers) {
			return t.errAt(fr.iT, "time_s", "output time %s s starts after %d cells of time %s s, want %d (every output time lists the same cells)",
				rec[fr.iT], fr.cell, fmtG(tb.Times[nt-1]), len(tb.Centers))
		}
		fr.flush()
		fr.cur = tb.Fields.column()
	}
	tb.Times = append(tb.Times, tm)
	fr.cell = 0
	return nil
}

// placeCell checks the cell at depth z: in the first block, cells go down
// the stack inside it and are recorded with their layer; later, each must
// be the first block's cell at the same place.
func (fr *fieldsReader) placeCell(rec []string, z float64) error {
	t, tb := fr.t, fr.tb
	if len(tb.Times) == 1 {
		if n := len(tb.Centers); n > 0 && !(z > tb.Centers[n-1]) {
			return t.errAt(fr.iZ, "depth_mm", "%s mm after %s mm: cells must go down the stack", rec[fr.iZ], fmtG(tb.Centers[n-1]))
		}
		if !(z > 0) {
			return t.errAt(fr.iZ, "depth_mm", "%s mm: a cell centre lies below the top face (depth > 0)", rec[fr.iZ])
		}
		if rec[fr.iL] == "" {
			return t.errAt(fr.iL, "layer", "empty layer name")
		}
		tb.Centers = append(tb.Centers, z)
		tb.LayerOf = append(tb.LayerOf, rec[fr.iL])
		return nil
	}
	cell := fr.cell
	if cell >= len(tb.Centers) {
		return t.errAt(fr.iZ, "depth_mm", "more than the %d cells of the first output time", len(tb.Centers))
	}
	if z != tb.Centers[cell] || rec[fr.iL] != tb.LayerOf[cell] {
		return t.errAt(fr.iZ, "depth_mm", "cell %d is %s mm in %q, but %s mm in %q at the first output time",
			cell+1, rec[fr.iZ], rec[fr.iL], fmtG(tb.Centers[cell]), tb.LayerOf[cell])
	}
	return nil
}

// readProbesCSV reads probes.csv: time_s, then T_<d>mm_C and cure_<d>mm for
// each probe, the driving temperatures (*_C), power_fraction, the probes'
// viscosities (viscosity_<d>mm_Pa_s) and
// heat_in_J_per_m2. Its times must be those of fields.csv.
func readProbesCSV(ctx context.Context, path string, tb *runTable) error {
	f, err := openOutput(path)
	if err != nil {
		return err
	}
	defer f.Close()
	t := newCSVTable(ctx, path, f)
	head, err := t.next()
	if err == io.EOF {
		return outputError(path, 1, 0, "", "empty file, want a header starting with time_s")
	}
	if err != nil {
		return err
	}
	head = slices.Clone(head) // the reader reuses its record
	if len(head) == 0 || head[0] != "time_s" {
		return outputError(path, 1, 1, "", "the header starts with %q, want time_s", head[0])
	}
	refs, hasPower, err := probeColumns(t, head, tb)
	if err != nil {
		return err
	}
	cures := make([][]float64, len(tb.Probes))
	viscs := make([][]float64, len(tb.Probes))
	row := 0
	for {
		rec, err := t.next()
		if err == io.EOF {
			break
		}
		if err != nil {
			return err
		}
		tm, err := t.number(rec, 0, "time_s", false)
		if err != nil {
			return err
		}
		if row >= len(tb.Times) {
			return t.errAt(0, "time_s", "more rows than the %d output times of %s", len(tb.Times), results.FieldsFile)
		}
		if tm != tb.Times[row] {
			return t.errAt(0, "time_s", "%s s, but output time %d of %s is %s s", rec[0], row+1, results.FieldsFile, fmtG(tb.Times[row]))
		}
		for i := 1; i < len(rec); i++ {
			r := refs[i]
			if r.probe < 0 && r.drv < 0 && !r.power {
				continue
			}
			v, err := t.number(rec, i, head[i], r.cure || r.power || r.visc)
			if err != nil {
				return err
			}
			switch {
			case r.cure:
				cures[r.probe] = append(cures[r.probe], v)
			case r.visc:
				viscs[r.probe] = append(viscs[r.probe], v)
			case r.probe >= 0:
				tb.Probes[r.probe].T = append(tb.Probes[r.probe].T, v)
			case r.drv >= 0:
				tb.Drivers[r.drv].Values = append(tb.Drivers[r.drv].Values, v)
			case r.power:
				tb.Power = append(tb.Power, v)
			}
		}
		row++
	}
	if row != len(tb.Times) {
		return outputError(path, t.line+1, 0, "", "%d rows, want one per output time of %s (%d)", row, results.FieldsFile, len(tb.Times))
	}
	for j := range tb.Probes {
		if cures[j] != nil && !allNaN(cures[j]) {
			tb.Probes[j].Cure = cures[j]
		}
		if viscs[j] != nil && !allNaN(viscs[j]) {
			tb.Probes[j].Viscosity = viscs[j]
		}
	}
	if !hasPower {
		tb.Power = nil
	}
	return nil
}

// probeColumn is what a column of probes.csv holds.
type probeColumn struct {
	probe int // index into tb.Probes, or -1
	cure  bool
	visc  bool
	drv   int // index into tb.Drivers, or -1
	power bool
}

// probeColumns reads the header head of probes.csv (read by t) into one
// probeColumn per column, adding tb's probes (T_<d>mm_C) and driving
// temperatures (*_C); a probe's cure and viscosity columns must follow its
// temperature column. hasPower reports a power_fraction column.
func probeColumns(t *csvTable, head []string, tb *runTable) (refs []probeColumn, hasPower bool, err error) {
	refs = make([]probeColumn, len(head))
	byLabel := map[string]int{}
	for i := 1; i < len(head); i++ {
		h := head[i]
		refs[i] = probeColumn{probe: -1, drv: -1}
		switch {
		case strings.HasPrefix(h, "T_") && strings.HasSuffix(h, "mm_C"):
			l := strings.TrimSuffix(strings.TrimPrefix(h, "T_"), "mm_C")
			z, err := strconv.ParseFloat(l, 64)
			if err != nil || z < 0 {
				return nil, false, t.errAt(i, "", "probe column %q: the depth %q is not a number of mm", h, l)
			}
			byLabel[l] = len(tb.Probes)
			refs[i].probe = len(tb.Probes)
			tb.Probes = append(tb.Probes, probeData{Label: l, Depth: z})
		case strings.HasPrefix(h, "cure_") && strings.HasSuffix(h, "mm"):
			l := strings.TrimSuffix(strings.TrimPrefix(h, "cure_"), "mm")
			j, ok := byLabel[l]
			if !ok {
				return nil, false, t.errAt(i, "", "column %q comes without T_%smm_C before it", h, l)
			}
			refs[i].probe, refs[i].cure = j, true
		case strings.HasPrefix(h, "viscosity_") && strings.HasSuffix(h, "mm_Pa_s"):
			l := strings.TrimSuffix(strings.TrimPrefix(h, "viscosity_"), "mm_Pa_s")
			j, ok := byLabel[l]
			if !ok {
				return nil, false, t.errAt(i, "", "column %q comes without T_%smm_C before it", h, l)
			}
			refs[i].probe, refs[i].visc = j, true
		case h == "power_fraction":
			refs[i].power, hasPower = true, true
		case h == "heat_in_J_per_m2":
		case strings.HasSuffix(h, "_C") && len(h) > 2:
			refs[i].drv = len(tb.Drivers)
			tb.Drivers = append(tb.Drivers, seriesData{Column: h, Name: driverName(h)})
		}
	}
	return refs, hasPower, nil
}

// readSummaryJSON reads summary.json into tb.Summary, and the optional
// gel points of the curing layers (key "gel_point": {"layer": 0.58}).
func readSummaryJSON(path string, tb *runTable) error {
	f, err := openOutput(path)
	if err != nil {
		return err
	}
	data, err := io.ReadAll(f)
	f.Close()
	if err != nil {
		return &cases.Error{File: path, Err: cases.Reason(cases.ErrFile, err, err.Error())}
	}
	fail := func(off int64, err error) error {
		line, col := offsetPosition(data, off)
		return outputError(path, line, col, "", "%v", err)
	}
	var extra struct {
		GelPoint map[string]float64 `json:"gel_point"`
	}
	for _, v := range []any{&tb.Summary, &extra} {
		dec := json.NewDecoder(bytes.NewReader(data))
		if err := dec.Decode(v); err != nil {
			var se *json.SyntaxError
			var te *json.UnmarshalTypeError
			switch {
			case errors.As(err, &se):
				return fail(se.Offset, err)
			case errors.As(err, &te):
				return fail(te.Offset, err)
			}
			return fail(dec.InputOffset(), err)
		}
	}
	if tb.Summary.Status == "" {
		return outputError(path, 1, 1, "status", "missing: this is not the summary.json of a run")
	}
	for name, g := range extra.GelPoint {
		if !(g > 0 && g < 1) {
			return outputError(path, 0, 0, "gel_point."+name, "%g is outside (0, 1)", g)
		}
	}
	tb.GelPoint = extra.GelPoint
	return nil
}

// offsetPosition converts a byte offset into data to a 1-based line and
// column.
func offsetPosition(data []byte, off int64) (line, col int) {
	off = min(max(off, 0), int64(len(data)))
	before := data[:off]
	line = 1 + bytes.Count(before, []byte{'\n'})
	col = int(off) - bytes.LastIndexByte(before, '\n')
	return line, col
}

func fmtG(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
