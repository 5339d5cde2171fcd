package results

import (
	"bytes"
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/outdir"
	"cureslab/solver"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"slices"
)

// Names of the files that WriteRun writes (README, Case file reference).
const (
	FieldsFile  = "fields.csv"
	ProbesFile  = "probes.csv"
	SummaryFile = "summary.json"
)

// WriteRun writes the output files of one run into dir, creating dir if it
// does not exist: fields.csv, probes.csv and summary.json (README, Case file reference).
// The directory holds one complete set (package outdir): the files are
// written under staging names and put in place together, files of an
// earlier run that this one does not write (a report, uncertainty.csv) are
// removed, a directory of another kind of output is refused, and a failed
// write leaves the previous set.
//
// The caller must have validated c (as Load does): WriteRun is the first
// thing that touches the output directory. r may come from a run that ended
// early (runaway, failure); the files then hold the snapshots reached and
// summary.json says so in its status.
//
// Number format: times in s (time_s) as the shortest decimal that reads
// back as the same float (num.AppendTime); temperatures in °C are rounded
// to 1e-6, depths in mm to 1e-9 (so 6.35 mm prints as 6.35, not 6.3500000000000005),
// then written as the shortest decimal; cure, cure rate and heat are written
// with 9 significant digits. A value that does not apply (NaN) is an empty
// cell.
func WriteRun(dir string, c *cases.Case, r *solver.Result, s Summary) error {
	if c == nil || c.Problem == nil || c.Problem.Mesh == nil || r == nil {
		return errors.New("results.WriteRun: case, problem, mesh and result are required")
	}
	set, err := outdir.Open(dir, RunKind)
	if err != nil {
		return err
	}
	if err := StageRun(set, c, r, s); err != nil {
		set.Abort()
		return err
	}
	return set.Commit()
}

// StageRun writes fields.csv, probes.csv and summary.json of a run into
// the output set (package outdir): they go in place together, with the
// set's other files, at its Commit. Preconditions as for WriteRun.
func StageRun(set *outdir.Set, c *cases.Case, r *solver.Result, s Summary) error {
	if err := set.Stage(FieldsFile, func(w io.Writer) error { return writeFields(w, c, r) }); err != nil {
		return fmt.Errorf("writing %s: %w", FieldsFile, err)
	}
	if err := set.Stage(ProbesFile, func(w io.Writer) error { return writeProbes(w, c, r) }); err != nil {
		return fmt.Errorf("writing %s: %w", ProbesFile, err)
	}
	return StageSummary(set, s)
}

// FieldsHeader is the header row of fields.csv; a case with volumetric
// heating adds PowerColumn.
var FieldsHeader = []string{"time_s", "depth_mm", "layer", "temperature_C", "cure", "cure_rate_per_s", "glass_transition_C"}

// PowerColumn is a column of fields.csv under volumetric heating: the
// power absorbed per volume in the cell at that time (W/m³), with the
// controller's power fraction held from that time on.
const PowerColumn = "power_W_per_m3"

// viscosityColumn is the last column of fields.csv when a layer has a
// viscosity law: the resin's viscosity in the cell (Pa·s), empty at and past
// gel and in layers without a viscosity law.
const viscosityColumn = "viscosity_Pa_s"

// csvChunk is the size at which the CSV writers hand their buffer to the
// writer: rows are formatted in place (num.AppendFixed, num.AppendSig) and
// written in chunks of about this size, so memory stays bounded for any run.
const csvChunk = 64 << 10

// appendCSVRecord appends rec as encoding/csv writes a record: fields
// quoted where encoding/csv quotes them, "\n" at the end.
func appendCSVRecord(b []byte, rec []string) []byte {
	var sb bytes.Buffer
	cw := csv.NewWriter(&sb)
	cw.Write(rec) // writing to a bytes.Buffer does not fail
	cw.Flush()
	return append(b, sb.Bytes()...)
}

// endRow ends the row in b with a newline and writes b to w once it has
// reached csvChunk; it returns the buffer to append to next.
func endRow(w io.Writer, b []byte) ([]byte, error) {
	b = append(b, '\n')
	if len(b) < csvChunk {
		return b, nil
	}
	_, err := w.Write(b)
	return b[:0], err
}

// sigCol and celsiusCol append the next column: a comma, then v with 9
// significant digits (num.Sig), or the temperature T (K) in °C rounded to
// 1e-6 (num.Fixed).
func sigCol(b []byte, v float64) []byte     { return num.AppendSig(append(b, ','), v) }
func celsiusCol(b []byte, T float64) []byte { return num.AppendFixed(append(b, ','), num.KtoC(T), 6) }

// fieldRows formats the rows of fields.csv of one case, a snapshot at a
// time: the columns that never change (depth, layer) are formatted once
// per cell, the time once per snapshot.
type fieldRows struct {
	n              int
	power, viscous bool
	curing         []bool
	mid            [][]byte // ",depth,layer," of each cell, as encoding/csv writes it
	t              []byte
}

// newFieldRows returns the row formatter of fields.csv for c and its
// header row (FieldsHeader, with the power and viscosity columns where
// they apply).
func newFieldRows(c *cases.Case) (*fieldRows, []string) {
	head := slices.Clip(FieldsHeader)
	f := &fieldRows{power: c.Problem.Volumetric != nil, viscous: cases.Viscous(c.Problem)}
	if f.power {
		head = append(head, PowerColumn)
	}
	if f.viscous {
		head = append(head, viscosityColumn)
	}
	m := c.Problem.Mesh
	n := m.Cells()
	f.n = n
	f.curing = make([]bool, n)
	// All cells through one csv.Writer into one buffer, then sliced.
	var cells bytes.Buffer
	cw := csv.NewWriter(&cells)
	ends := make([]int, n+1)
	for i := range n {
		j := m.Owner[i]
		f.curing[i] = j < len(c.Problem.Materials) && c.Problem.Materials[j] != nil && c.Problem.Materials[j].Cure != nil
		cw.Write([]string{"", num.FormatDepth(m.Centers[i]), m.Layers[j].Name, ""}) // a bytes.Buffer does not fail
		cw.Flush()
		ends[i+1] = cells.Len()
	}
	f.mid = make([][]byte, n)
	for i := range n {
		f.mid[i] = cells.Bytes()[ends[i] : ends[i+1]-1] // without its newline
	}
	return f, head
}

// append appends the rows of snapshot s (number k, for messages) to b,
// handing b to w each time it reaches csvChunk (endRow); it returns the
// buffer to append to next.
func (f *fieldRows) append(w io.Writer, b []byte, s *solver.Snapshot, k int) ([]byte, error) {
	n := f.n
	if len(s.T) != n {
		return b, fmt.Errorf("snapshot %d has %d temperatures for %d cells", k, len(s.T), n)
	}
	f.t = num.AppendTime(f.t[:0], s.Time)
	for i := range n {
		b = append(b, f.t...)
		b = append(b, f.mid[i]...)
		b = num.AppendFixed(b, num.KtoC(s.T[i]), 6)
		if f.curing[i] {
			b = sigCol(b, num.At(s.Cure, i))
			b = sigCol(b, num.At(s.Rate, i))
			b = celsiusCol(b, num.At(s.Tg, i))
		} else {
			b = append(b, ",,,"...)
		}
		if f.power {
			b = sigCol(b, num.At(s.Power, i))
		}
		if f.viscous {
			b = sigCol(b, num.At(s.Viscosity, i))
		}
		var err error
		if b, err = endRow(w, b); err != nil {
			return b, err
		}
	}
	return b, nil
}

// writeFields writes fields.csv: one row per (output time, cell centre).
// The bytes are those encoding/csv writes for the header and the formatted
// fields (num.Fixed, num.Sig; the layer name quoted as encoding/csv quotes
// it), built with append-style formatting (fieldRows).
func writeFields(w io.Writer, c *cases.Case, r *solver.Result) error {
	f, head := newFieldRows(c)
	b := appendCSVRecord(make([]byte, 0, csvChunk+512), head)
	for k := range r.Snapshots {
		var err error
		if b, err = f.append(w, b, &r.Snapshots[k], k); err != nil {
			return err
		}
	}
	_, err := w.Write(b)
	return err
}

// probesHeader returns the header row of probes.csv for c.
func probesHeader(c *cases.Case) []string {
	p := c.Problem
	h := []string{"time_s"}
	for _, d := range p.Probes {
		l := num.FormatDepth(d)
		h = append(h, "T_"+l+"mm_C", "cure_"+l+"mm")
	}
	if p.Top.HasAir() {
		h = append(h, "air_top_C")
	}
	if p.Bottom.HasAir() {
		h = append(h, "air_bottom_C")
	}
	if cases.Controlled(p) {
		h = append(h, ProgramColumn, "power_fraction")
	}
	h = append(h, "heat_in_J_per_m2")
	if cases.Viscous(p) {
		for _, d := range p.Probes {
			h = append(h, probeViscosityColumn(num.FormatDepth(d)))
		}
	}
	return h
}

// ProgramColumn is the column of probes.csv that holds, under closed-loop
// volumetric heating, the temperature that the control program asks of the
// sensor at each output time, in °C.
const ProgramColumn = "program_C"

// probeViscosityColumn returns the name of the probes.csv column of the
// viscosity at the probe whose depth label (mm) is label:
// viscosity_<label>mm_Pa_s, empty at and past gel and in layers without a
// viscosity law.
func probeViscosityColumn(label string) string { return "viscosity_" + label + "mm_Pa_s" }

// appendProbeRow appends the row of probes.csv of snapshot s of a run of
// c to b, formatted like fieldRows, and hands b to w once it reaches
// csvChunk (endRow).
func appendProbeRow(w io.Writer, b []byte, c *cases.Case, s *solver.Snapshot) ([]byte, error) {
	p := c.Problem
	b = num.AppendTime(b, s.Time)
	for i := range p.Probes {
		b = celsiusCol(b, num.At(s.ProbeT, i))
		b = sigCol(b, num.At(s.ProbeCure, i))
	}
	if p.Top.HasAir() {
		b = celsiusCol(b, s.AirTop)
	}
	if p.Bottom.HasAir() {
		b = celsiusCol(b, s.AirBottom)
	}
	if cases.Controlled(p) {
		b = celsiusCol(b, p.Volumetric.Control.Program.At(s.Time))
		b = sigCol(b, s.PowerFraction)
	}
	b = sigCol(b, s.HeatIn)
	if cases.Viscous(p) {
		for i := range p.Probes {
			b = sigCol(b, num.At(s.ProbeViscosity, i))
		}
	}
	return endRow(w, b)
}

// writeProbes writes probes.csv: one row per output time (appendProbeRow).
func writeProbes(w io.Writer, c *cases.Case, r *solver.Result) error {
	b := appendCSVRecord(make([]byte, 0, csvChunk+512), probesHeader(c))
	for k := range r.Snapshots {
		var err error
		if b, err = appendProbeRow(w, b, c, &r.Snapshots[k]); err != nil {
			return err
		}
	}
	_, err := w.Write(b)
	return err
}

// writeSummary writes summary.json: one indented object and a newline.
func writeSummary(w io.Writer, s Summary) error {
	b, err := json.MarshalIndent(s, "", "  ")
	if err != nil {
		return err
	}
	b = append(b, '\n')
	_, err = w.Write(b)
	return err
}

// FieldsSize estimates fields.csv of a run of c before it runs: rows =
// cells × output times (t = 0 and the end included), bytes = rows × a
// row's typical length (about 60 characters of numbers plus the layer's
// name, more with the power and viscosity columns). The estimate is within
// a few tens of per cent of the file, enough to refuse a run whose output
// would fill a disk (memory does not grow with it: the rows are
// streamed, runWriter). Cost O(cells).
func FieldsSize(c *cases.Case) (bytes, rows int64) {
	p := c.Problem
	if p == nil || p.Mesh == nil {
		return 0, 0
	}
	times := int64(101)
	if p.OutputTimes != nil {
		times = int64(len(p.OutputTimes)) + 2
	}
	extra := 0
	if p.Volumetric != nil {
		extra += 12
	}
	var perTime int64
	for i := range p.Mesh.Cells() {
		perTime += int64(60 + extra + len(p.Mesh.Layers[p.Mesh.Owner[i]].Name))
	}
	cells := int64(p.Mesh.Cells())
	return perTime * times, cells * times
}
