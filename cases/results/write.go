package results

import (
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/internal/textout"
	"cureslab/physics"
	"cureslab/solver"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"slices"
)

// Names of the files that WriteRun writes (SPEC §5).
const (
	FieldsFile  = "fields.csv"
	ProbesFile  = "probes.csv"
	SummaryFile = "summary.json"
)

// WriteRun writes the output files of one run into dir, creating dir if it
// does not exist: fields.csv, probes.csv and summary.json (SPEC §5, §10).
// Each file is written with WriteFileAtomic, so an existing directory gets
// its files replaced one by one and a failed write leaves the previous file.
//
// The caller must have validated c (as Load does): WriteRun is the first
// thing that touches the output directory. r may come from a run that ended
// early (runaway, failure); the files then hold the snapshots reached and
// summary.json says so in its status.
//
// Number format: temperatures in °C and times in s are rounded to 1e-6,
// depths in mm to 1e-9 (so 6.35 mm prints as 6.35, not 6.3500000000000005),
// then written as the shortest decimal; cure, cure rate and heat are written
// with 9 significant digits. A value that does not apply (NaN) is an empty
// cell.
func WriteRun(dir string, c *cases.Case, r *solver.Result, s Summary) error {
	if c == nil || c.Problem == nil || c.Problem.Mesh == nil || r == nil {
		return errors.New("results.WriteRun: case, problem, mesh and result are required")
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	if err := textout.WriteFileAtomic(dir, FieldsFile, func(w io.Writer) error { return writeFields(w, c, r) }); err != nil {
		return fmt.Errorf("writing %s: %w", FieldsFile, err)
	}
	if err := textout.WriteFileAtomic(dir, ProbesFile, func(w io.Writer) error { return writeProbes(w, c, r) }); err != nil {
		return fmt.Errorf("writing %s: %w", ProbesFile, err)
	}
	if err := textout.WriteFileAtomic(dir, SummaryFile, func(w io.Writer) error { return writeSummary(w, s) }); err != nil {
		return fmt.Errorf("writing %s: %w", SummaryFile, err)
	}
	return nil
}

// FieldsHeader is the header row of fields.csv; a case with volumetric
// heating adds PowerColumn.
var FieldsHeader = []string{"time_s", "depth_mm", "layer", "temperature_C", "cure", "cure_rate_per_s", "glass_transition_C"}

// PowerColumn is the last column of fields.csv under volumetric heating:
// the power absorbed per volume in the cell at that time (W/m³), with the
// controller's power fraction held from that time on.
const PowerColumn = "power_W_per_m3"

// writeFields writes fields.csv: one row per (output time, cell centre).
func writeFields(w io.Writer, c *cases.Case, r *solver.Result) error {
	cw := csv.NewWriter(w)
	head := FieldsHeader
	power := c.Problem.Volumetric != nil
	if power {
		head = append(slices.Clip(FieldsHeader), PowerColumn)
	}
	if err := cw.Write(head); err != nil {
		return err
	}
	m := c.Problem.Mesh
	n := m.Cells()
	curing := make([]bool, n)
	depth := make([]string, n)
	layer := make([]string, n)
	for i := range n {
		j := m.Owner[i]
		curing[i] = j < len(c.Problem.Materials) && c.Problem.Materials[j] != nil && c.Problem.Materials[j].Cure != nil
		depth[i] = num.FormatDepth(m.Centers[i])
		layer[i] = m.Layers[j].Name
	}
	row := make([]string, len(head))
	for k := range r.Snapshots {
		s := &r.Snapshots[k]
		if len(s.T) != n {
			return fmt.Errorf("snapshot %d has %d temperatures for %d cells", k, len(s.T), n)
		}
		t := num.Fixed(s.Time, 6)
		for i := range n {
			row[0], row[1], row[2] = t, depth[i], layer[i]
			row[3] = num.Fixed(num.KtoC(s.T[i]), 6)
			row[4], row[5], row[6] = "", "", ""
			if curing[i] {
				row[4] = num.Sig(num.At(s.Cure, i))
				row[5] = num.Sig(num.At(s.Rate, i))
				row[6] = num.Fixed(num.KtoC(num.At(s.Tg, i)), 6)
			}
			if power {
				row[7] = num.Sig(num.At(s.Power, i))
			}
			if err := cw.Write(row); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

// probesHeader returns the header row of probes.csv for c.
func probesHeader(c *cases.Case) []string {
	p := c.Problem
	h := []string{"time_s"}
	for _, d := range p.Probes {
		l := num.FormatDepth(d)
		h = append(h, "T_"+l+"mm_C", "cure_"+l+"mm")
	}
	if p.Top.Kind == physics.Convection {
		h = append(h, "air_top_C")
	}
	if p.Bottom.Kind == physics.Convection {
		h = append(h, "air_bottom_C")
	}
	if cases.Controlled(p) {
		h = append(h, "power_fraction")
	}
	return append(h, "heat_in_J_per_m2")
}

// writeProbes writes probes.csv: one row per output time.
func writeProbes(w io.Writer, c *cases.Case, r *solver.Result) error {
	cw := csv.NewWriter(w)
	h := probesHeader(c)
	if err := cw.Write(h); err != nil {
		return err
	}
	p := c.Problem
	row := make([]string, 0, len(h))
	for k := range r.Snapshots {
		s := &r.Snapshots[k]
		row = append(row[:0], num.Fixed(s.Time, 6))
		for i := range p.Probes {
			row = append(row, num.Fixed(num.KtoC(num.At(s.ProbeT, i)), 6), num.Sig(num.At(s.ProbeCure, i)))
		}
		if p.Top.Kind == physics.Convection {
			row = append(row, num.Fixed(num.KtoC(s.AirTop), 6))
		}
		if p.Bottom.Kind == physics.Convection {
			row = append(row, num.Fixed(num.KtoC(s.AirBottom), 6))
		}
		if cases.Controlled(p) {
			row = append(row, num.Sig(s.PowerFraction))
		}
		row = append(row, num.Sig(s.HeatIn))
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
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
