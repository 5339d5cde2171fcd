package report

import (
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/internal/textout"
	"cureslab/cases/outdir"
	"cureslab/cases/results"
	"cureslab/solver"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"strconv"
	"time"
)

// ReportFile is the name of the HTML report of a run (README, Case file reference).
const ReportFile = "report.html"

// reportClock gives the time stamped on a report; tests replace it.
var reportClock = func() time.Time { return time.Now() }

// WriteReport writes report.html for a run of c into dir (README, Case file reference): one
// self-contained page, readable offline and when mailed, with depth–time
// maps of temperature and of degree of cure (layer faces and the gel front
// drawn), profiles through the thickness at chosen times, probe histories
// with the driving air temperatures and the power fraction, the summary and
// each acceptance criterion, and the cautions (check.Cautions).
//
// Method: the page shows exactly what fields.csv, probes.csv and
// summary.json hold. Values are rounded as WriteRun writes them, so the
// page equals the one RedrawReport draws from those files, apart from the
// time stamp. Plots are drawn with gonum.org/v1/plot into inline SVG; the
// maps are raster images (PNG with a 256-colour palette, cividis) inside
// the SVG, so a long run stays small. See mapImage for the resampling. The
// maps and profiles are drawn from the fields of at most fieldTimesKept
// output times and three more (fieldColumns, the rule); the histories from
// every output time.
//
// Preconditions: as for WriteRun (c validated, r from solver.Run on
// c.Problem, possibly ended early). The file is written with
// WriteFileAtomic; dir is created if missing. Cost: linear in the number of
// snapshots × cells, the maps capped at 1600 × 1200 pixels; memory
// O(cells × fieldTimesKept) beyond r; for the examples about 0.05 s and
// 50–130 kB.
//
// Interruption: ctx is checked before each figure; once it is done the
// drawing stops, nothing is written and the error wraps ctx.Err().
func WriteReport(ctx context.Context, dir string, c *cases.Case, r *solver.Result, s results.Summary) error {
	if c == nil || c.Problem == nil || c.Problem.Mesh == nil || r == nil {
		return errors.New("report.WriteReport: case, problem, mesh and result are required")
	}
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("drawing %s: %w", ReportFile, err)
	}
	d, err := runDataOf(c, r, s)
	if err != nil {
		return fmt.Errorf("report: %w", err)
	}
	return writeRunReport(ctx, dir, d)
}

// RedrawReport reads the output files of a run in dir (fields.csv,
// probes.csv and summary.json, README, Case file reference) and writes dir/report.html from
// them, as WriteReport does at the end of the run; no case file is needed.
//
// The layers and their depths are read from fields.csv: the cell faces are
// rebuilt from the cell centres (the first face is at depth 0 and each face
// lies as far below a centre as the face above it lies above). The gel front
// is drawn for a curing layer only when summary.json records its gel point
// (key "gel_point", an object keyed by layer name); otherwise the page says
// that it is not drawn.
//
// fields.csv is read one output time after the other into the bounded set
// the report draws (fieldColumns): memory O(cells × fieldTimesKept) plus
// the probes' values at every output time, however long the file.
//
// Errors: a missing or unreadable file wraps ErrFile; a malformed one wraps
// ErrOutputFile. Both are *Error with the file and, where there is one, the
// line and column. Nothing is written then. When ctx is done (checked
// every 64 kB read and before each figure) the error wraps
// ctx.Err() and nothing is written either.
func RedrawReport(ctx context.Context, dir string) error {
	d, err := readRunData(ctx, dir)
	if err != nil {
		return err
	}
	return writeRunReport(ctx, dir, d)
}

// StageReport draws report.html for a run, as WriteReport does, into the
// output set (package outdir): it goes in place with the run's files at
// the set's Commit. When ctx is done before the page is drawn, nothing is
// staged and the error wraps ctx.Err() (errors.Is).
func StageReport(ctx context.Context, set *outdir.Set, c *cases.Case, r *solver.Result, s results.Summary) error {
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("drawing %s: %w", ReportFile, err)
	}
	d, err := runDataOf(c, r, s)
	if err != nil {
		return fmt.Errorf("report: %w", err)
	}
	return stageRunReport(ctx, set, d)
}

// stageRunReport draws the page of d (drawPage) and stages it in set.
func stageRunReport(ctx context.Context, set *outdir.Set, d *runData) error {
	b, err := drawPage(ctx, func(w io.Writer) error { return renderRunReport(ctx, w, d, reportClock()) })
	if err != nil {
		return fmt.Errorf("drawing %s: %w", ReportFile, err)
	}
	if err := set.Stage(ReportFile, func(w io.Writer) error { _, err := w.Write(b); return err }); err != nil {
		return fmt.Errorf("writing %s: %w", ReportFile, err)
	}
	return nil
}

func writeRunReport(ctx context.Context, dir string, d *runData) error {
	return writePage(ctx, dir, ReportFile, func(w io.Writer) error { return renderRunReport(ctx, w, d, reportClock()) })
}

// writePage draws a page through render in memory (drawPage) and writes it
// to dir/file in one go (a temporary file renamed; dir made if missing).
// When ctx is done before the page is drawn, nothing is written and the
// error wraps ctx.Err().
func writePage(ctx context.Context, dir, file string, render func(io.Writer) error) error {
	b, err := drawPage(ctx, render)
	if err != nil {
		return fmt.Errorf("drawing %s: %w", file, err)
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	if err := textout.WriteFileAtomic(dir, file, func(w io.Writer) error {
		_, err := w.Write(b)
		return err
	}); err != nil {
		return fmt.Errorf("writing %s: %w", file, err)
	}
	return nil
}

// runData is what the report of one run shows, in the units of the output
// files: times in s, depths in mm, temperatures in °C. It is built from the
// rows of fields.csv and probes.csv and from summary.json, whether those
// come from memory (runDataOf) or from the files (readRunData), by
// newRunData.
type runData struct {
	Title   string
	Summary results.Summary

	Times   []float64   // output times, s, strictly increasing
	Centers []float64   // cell centres, mm, top to bottom
	Faces   []float64   // cell faces, mm, len(Centers)+1, Faces[0] = 0
	Layers  []layerData // top to bottom
	GelTime []float64   // s per cell; NaN when the cell never gels or its gel point is unknown

	// The fields of every cell at the output times kept (fieldColumns):
	// column j is output time FieldAt[j], at FieldTimes[j] = Times[FieldAt[j]].
	FieldAt    []int
	FieldTimes []float64
	T          [][]float64 // °C, [column][cell]
	Cure       [][]float64 // [column][cell], NaN in cells that do not cure
	// Absorbed is the volumetric power absorbed per cell, W/m³
	// [column][cell] (fields.csv power_W_per_m3); nil without volumetric
	// heating.
	Absorbed [][]float64
	// Over every output time: the range of the temperatures (°C), the
	// hottest cell's temperature and the least cure (NaN without a curing
	// cell) at each.
	TLo, THi           float64
	Hottest, LeastCure []float64

	Probes  []probeData
	Drivers []seriesData // driving temperatures (air), °C per time
	Power   []float64    // power fraction per time; nil when not controlled
	// Volumetric reports that the run had volumetric heating (from the
	// case, or from the output files: a power column).
	Volumetric bool
	// Page is, on a comparison's page, the path of the case's own
	// report.html from the comparison page's folder (casePage); "" when
	// it has none or where it is is not known.
	Page string
}

// layerData is one layer of the stack as the report shows it.
type layerData struct {
	Name          string
	Top, Bottom   float64 // mm
	First, End    int     // cells [First, End)
	Curing        bool
	GelPoint      float64 // NaN when the layer does not cure or the gel point is unknown
	GelPointKnown bool
}

// probeData is one probe column pair of probes.csv.
type probeData struct {
	Label string    // depth in mm as in the column names ("6.35")
	Depth float64   // mm
	T     []float64 // °C per time
	Cure  []float64 // per time; nil when the probe sits in a layer that does not cure
	// Viscosity is the resin's viscosity at the probe, Pa·s per time (NaN
	// at and past gel); nil without a viscosity law there.
	Viscosity []float64
}

// seriesData is a named series over the output times.
type seriesData struct {
	Column string // column name in probes.csv, "air_top_C"
	Name   string // legend text, "air, top face"
	Values []float64
}

// runTable is the raw content of the output files before the report's own
// derived quantities (faces, layers, gel times) are computed.
type runTable struct {
	Summary  results.Summary
	GelPoint map[string]float64 // by layer name; nil when not recorded

	Times   []float64
	Centers []float64
	LayerOf []string      // layer name per cell
	Fields  *fieldColumns // nil before the first output time

	Probes     []probeData
	Drivers    []seriesData
	Power      []float64
	Volumetric bool
}

// newFields prepares tb.Fields for its cells (tb.Centers, tb.LayerOf), with
// the gel point of each cell's layer where tb.GelPoint records it.
func (tb *runTable) newFields(power bool) {
	gel := make([]float64, len(tb.LayerOf))
	for i, l := range tb.LayerOf {
		gel[i] = math.NaN()
		if g, ok := tb.GelPoint[l]; ok {
			gel[i] = g
		}
	}
	tb.Fields = newFieldColumns(len(tb.LayerOf), power, gel)
}

// runDataOf builds the report data of a run kept in memory (Collector).
func runDataOf(c *cases.Case, r *solver.Result, s results.Summary) (*runData, error) {
	k := NewCollector(c)
	for i := range r.Snapshots {
		if err := k.Add(&r.Snapshots[i]); err != nil {
			return nil, err
		}
	}
	return k.data(s)
}

// Collector gathers what the report of a run draws from its snapshots, one
// at a time as the solver hands them over (Add is a solver.Sink), with
// every value rounded as the output files hold it, so that the page does
// not depend on whether it is drawn at the end of the run or from the
// files (RedrawReport). It keeps the fields of a bounded set of output
// times (fieldColumns, fieldTimesKept) and, of every output time, the
// probes, the driving temperatures and the power fraction: memory
// O(cells × fieldTimesKept + (probes + 1) × output times).
type Collector struct {
	c          *cases.Case
	tb         *runTable
	curing     []bool
	air        []seriesData
	prog       []float64
	controlled bool // probes.csv has program_C and power_fraction
	viscous    bool // probes.csv has a viscosity column per probe
}

// NewCollector prepares the report of a run of c. Preconditions: c
// validated (cases.Load or cases.Parse).
func NewCollector(c *cases.Case) *Collector {
	p := c.Problem
	m := p.Mesh
	n := m.Cells()
	k := &Collector{c: c, curing: make([]bool, n),
		tb:         &runTable{GelPoint: map[string]float64{}, Volumetric: p.Volumetric != nil},
		controlled: p.Volumetric != nil && p.Volumetric.Control != nil, viscous: cases.Viscous(p)}
	tb := k.tb
	for i := range n {
		j := m.Owner[i]
		tb.Centers = append(tb.Centers, readBack(num.FormatDepth(m.Centers[i])))
		tb.LayerOf = append(tb.LayerOf, m.Layers[j].Name)
		if j < len(p.Materials) && p.Materials[j] != nil && p.Materials[j].Cure != nil {
			k.curing[i] = true
			tb.GelPoint[m.Layers[j].Name] = p.Materials[j].Cure.GelPoint
		}
	}
	tb.newFields(p.Volumetric != nil)
	for _, d := range p.Probes {
		l := num.FormatDepth(d)
		tb.Probes = append(tb.Probes, probeData{Label: l, Depth: readBack(l)})
	}
	if p.Top.HasAir() {
		k.air = append(k.air, seriesData{Column: "air_top_C"})
	}
	if p.Bottom.HasAir() {
		k.air = append(k.air, seriesData{Column: "air_bottom_C"})
	}
	return k
}

// Add takes the next snapshot of the run (in time order). It keeps none of
// s's slices. Errors: a snapshot without a temperature per cell.
func (k *Collector) Add(s *solver.Snapshot) error {
	p := k.c.Problem
	tb := k.tb
	n := len(tb.Centers)
	if len(s.T) != n {
		return fmt.Errorf("snapshot %d has %d temperatures for %d cells", len(tb.Times), len(s.T), n)
	}
	tb.Times = append(tb.Times, s.Time+0) // as written: exact (num.AppendTime)
	col := tb.Fields.column()
	for i := range n {
		col.T[i] = num.Round(num.KtoC(s.T[i]), 6)
		col.Cure[i] = math.NaN()
		if k.curing[i] {
			col.Cure[i] = num.RoundSig(num.At(s.Cure, i))
		}
		if col.P != nil {
			col.P[i] = num.RoundSig(num.At(s.Power, i))
		}
	}
	tb.Fields.add(s.Time, col)
	for j := range tb.Probes {
		pr := &tb.Probes[j]
		pr.T = append(pr.T, num.Round(num.KtoC(num.At(s.ProbeT, j)), 6))
		pr.Cure = append(pr.Cure, num.RoundSig(num.At(s.ProbeCure, j)))
		if k.viscous {
			pr.Viscosity = append(pr.Viscosity, num.RoundSig(num.At(s.ProbeViscosity, j)))
		}
	}
	for j := range k.air {
		v := s.AirTop
		if k.air[j].Column == "air_bottom_C" {
			v = s.AirBottom
		}
		k.air[j].Values = append(k.air[j].Values, num.Round(num.KtoC(v), 6))
	}
	if k.controlled {
		k.prog = append(k.prog, num.Round(num.KtoC(p.Volumetric.Control.Program.At(s.Time)), 6))
		tb.Power = append(tb.Power, num.RoundSig(s.PowerFraction))
	}
	return nil
}

// data returns the report data of the snapshots added, with summary s.
func (k *Collector) data(s results.Summary) (*runData, error) {
	tb := *k.tb
	tb.Summary = s
	tb.Probes = slices.Clone(tb.Probes)
	for j := range tb.Probes {
		if allNaN(tb.Probes[j].Cure) {
			tb.Probes[j].Cure = nil
		}
		if allNaN(tb.Probes[j].Viscosity) {
			tb.Probes[j].Viscosity = nil
		}
	}
	tb.Drivers = nil
	for _, a := range k.air {
		tb.Drivers = append(tb.Drivers, seriesData{Column: a.Column, Name: driverName(a.Column), Values: a.Values})
	}
	if k.controlled {
		tb.Drivers = append(tb.Drivers, seriesData{Column: results.ProgramColumn, Name: driverName(results.ProgramColumn), Values: k.prog})
	}
	return newRunData(&tb, "")
}

// Stage draws report.html of the run whose snapshots were added, with
// summary s, into the output set (package outdir): it goes in place with
// the run's files at the set's Commit. When ctx is done before the page is
// drawn, nothing is staged and the error wraps ctx.Err() (errors.Is).
func (k *Collector) Stage(ctx context.Context, set *outdir.Set, s results.Summary) error {
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("drawing %s: %w", ReportFile, err)
	}
	d, err := k.data(s)
	if err != nil {
		return fmt.Errorf("report: %w", err)
	}
	return stageRunReport(ctx, set, d)
}

// readBack parses a number that this package formatted itself.
func readBack(s string) float64 {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		panic("report: cannot read back " + s)
	}
	return v
}

func allNaN(x []float64) bool {
	for _, v := range x {
		if !math.IsNaN(v) {
			return false
		}
	}
	return true
}

// driverName is the legend text of a driving-temperature column of
// probes.csv: "air_top_C" gives "air, top face".
func driverName(col string) string {
	switch col {
	case "air_top_C":
		return "air, top face"
	case "air_bottom_C":
		return "air, bottom face"
	case results.ProgramColumn:
		return "control program"
	}
	name := col[:len(col)-len("_C")]
	b := []byte(name)
	for i, c := range b {
		if c == '_' {
			b[i] = ' '
		}
	}
	return string(b)
}

// newRunData derives what the report draws from the tables: the cell faces,
// the layers, the gel time of every cell and the kept fields. file names
// the source of the tables in messages ("" for memory).
//
// Cell faces: f₀ = 0 and f_{i+1} = 2c_i − f_i, which recovers the faces of
// any mesh from its centres; the rounding of the centres to 1e-9 mm moves a
// face by at most 2·n·1e-9 mm.
//
// Gel time of a cell: the first output time at which its cure reaches the
// gel point of its layer, interpolated linearly in time between that output
// and the one before (fieldColumns, over every output time); so it is as
// fine as the output interval.
func newRunData(tb *runTable, file string) (*runData, error) {
	n := len(tb.Centers)
	if n == 0 || len(tb.Times) == 0 || tb.Fields == nil {
		return nil, fmt.Errorf("%sno cells or no output times", prefix(file))
	}
	f := tb.Fields
	d := &runData{
		Title: tb.Summary.Title, Summary: tb.Summary,
		Times: tb.Times, Centers: tb.Centers,
		Probes: tb.Probes, Drivers: tb.Drivers, Power: tb.Power,
		Volumetric: tb.Volumetric || tb.Power != nil || f.power,
		TLo:        f.tLo, THi: f.tHi, Hottest: f.hottest, LeastCure: f.least,
	}
	for _, c := range f.columns() {
		d.FieldAt = append(d.FieldAt, c.k)
		d.FieldTimes = append(d.FieldTimes, tb.Times[c.k])
		d.T = append(d.T, c.T)
		d.Cure = append(d.Cure, c.Cure)
		if f.power {
			d.Absorbed = append(d.Absorbed, c.P)
		}
	}
	d.Faces = make([]float64, n+1)
	for i, c := range tb.Centers {
		fc := 2*c - d.Faces[i]
		if !(fc > d.Faces[i]) {
			return nil, fmt.Errorf("%sthe cell centres (depth_mm) do not fit a mesh that starts at depth 0: cell %d at %g mm leaves no room for its width",
				prefix(file), i+1, c)
		}
		d.Faces[i+1] = fc
	}
	for i := 0; i < n; {
		j := i
		for j < n && tb.LayerOf[j] == tb.LayerOf[i] {
			j++
		}
		l := layerData{Name: tb.LayerOf[i], Top: d.Faces[i], Bottom: d.Faces[j], First: i, End: j, GelPoint: math.NaN()}
		l.Curing = slices.Contains(f.cured[i:j], true)
		if g, ok := tb.GelPoint[l.Name]; ok && l.Curing {
			l.GelPoint, l.GelPointKnown = g, true
		}
		d.Layers = append(d.Layers, l)
		i = j
	}
	d.GelTime = make([]float64, n)
	for _, l := range d.Layers {
		for i := l.First; i < l.End; i++ {
			d.GelTime[i] = math.NaN()
			if l.GelPointKnown {
				d.GelTime[i] = f.gelTime[i]
			}
		}
	}
	return d, nil
}

func prefix(file string) string {
	if file == "" {
		return ""
	}
	return file + ": "
}
