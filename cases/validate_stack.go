package cases

import (
	"fmt"
	"math"
	"strings"

	"cureslab/cases/units"
	"cureslab/mesh"
	"cureslab/physics"
	"cureslab/solver"
)

var (
	layerKeys    = []string{"name", "material", "thickness", "cells", "contact_resistance"}
	meshKeys     = []string{"max_cell", "growth"}
	initialKeys  = []string{"temperature", "cure"}
	timeKeys     = []string{"end", "output_every", "max_step", "temperature_tolerance", "cure_tolerance", "abort_temperature"}
	outputKeys   = []string{"probes"}
	criteriaKeys = []string{"min_cure", "max_temperature", "max_spread", "flow_viscosity", "min_flow_window"}
)

// Limits that keep a case within what a run can hold in memory.
const (
	maxCells       = 100000  // cells in the whole mesh
	maxOutputTimes = 1000000 // snapshots of one run
	maxThickness   = 1e3     // m, one layer (as mesh.Build)
)

// layerDef is one resolved [[layer]].
type layerDef struct {
	info LayerInfo
	geom mesh.Layer
	mat  *physics.Material
}

// layers reads every [[layer]] and resolves its material: a [materials.X]
// of the case first, else a built-in. ok is false if any layer is invalid.
func (l *loader) layers(root *table, defs map[string]*physics.Material) ([]layerDef, bool) {
	if !root.has("layer") {
		l.errs = append(l.errs, &Error{File: l.file, Key: "layer",
			Err:  &detail{Kind: ErrMissing, Msg: "the case has no [[layer]]: list the stack top to bottom"},
			Hint: "add, for example:\n[[layer]]\nname = \"potting\"\nmaterial = \"demo-epoxy\"\nthickness = \"10 mm\""})
		return nil, false
	}
	var items []any
	switch v := root.m["layer"].(type) {
	case []map[string]any:
		for _, m := range v {
			items = append(items, m)
		}
	case []any:
		items = v
	default:
		l.atValue("layer", ErrType, "layer must be an array of tables, got %s", KindOf(v)).Hint =
			"write [[layer]] (two brackets) before each layer, top to bottom"
		return nil, false
	}
	if len(items) == 0 {
		l.atValue("layer", ErrMissing, "the stack has no layers")
		return nil, false
	}
	before := len(l.errs)
	builtins := make(map[string]*physics.Material)
	names := make(map[string]string) // name -> path of the layer that has it
	out := make([]layerDef, len(items))
	for i, v := range items {
		path := fmt.Sprintf("layer.%d", i)
		t := l.open(path, v, layerKeys, nil)
		if t == nil {
			continue
		}
		l.require(t, "name", "material", "thickness")
		d := &out[i]
		if name, ok := l.str(t, "name"); ok {
			switch {
			case strings.TrimSpace(name) == "":
				l.atValue(t.keyPath("name"), ErrRange, "a layer name must not be empty")
			case strings.ContainsAny(name, ".\n\r\t"):
				l.rangeErr(t.keyPath("name"), name, "a layer name must not contain dots or control characters (it is used in key paths like layer.NAME.thickness)")
			case names[name] != "":
				prev := l.loc.Value(names[name] + ".name")
				l.atValue(t.keyPath("name"), ErrDuplicate, "duplicate layer name %q (already used on line %d)", name, prev.Line)
			default:
				names[name] = path
			}
			d.info.Name, d.geom.Name = name, name
		}
		if mat, ok := l.str(t, "material"); ok {
			d.info.Material = mat
			if m, own := defs[mat]; own {
				d.mat = m // nil when the material has errors of its own
			} else if m, ok := builtins[mat]; ok {
				d.mat, d.info.Builtin = m, true
			} else if m, ok := physics.Builtin(mat); ok {
				builtins[mat] = m
				d.mat, d.info.Builtin = m, true
			} else {
				msg := fmt.Sprintf("unknown material %q", mat)
				if g := Suggest(mat, materialNames(defs)); g != "" {
					msg += fmt.Sprintf("; did you mean %q?", g)
				}
				l.atValue(t.keyPath("material"), ErrReference, "%s", msg).Hint =
					fmt.Sprintf("define it as [materials.%s] or use a built-in: %s", mat, strings.Join(physics.BuiltinNames(), ", "))
			}
		}
		if th, ok := l.quantity(t, "thickness", units.Length); ok {
			if !(th > 0 && th <= maxThickness) {
				l.rangeErr(t.keyPath("thickness"), t.m["thickness"], "thickness must be positive (and at most 1 km)")
			}
			d.geom.Thickness = th
		}
		if n, ok := l.integer(t, "cells"); ok {
			if n < 1 || n > maxCells {
				l.rangeErr(t.keyPath("cells"), n, "cells must be between 1 and %d", maxCells)
			}
			d.geom.Cells = int(min(max(n, 0), maxCells))
		}
		if t.has("contact_resistance") {
			if i == 0 {
				l.atKey(t.keyPath("contact_resistance"), ErrRange, "the first layer has no layer above it: contact_resistance belongs to the face shared with the layer above").Hint =
					"give contact_resistance on the lower of the two layers that touch"
			} else if r, ok := l.quantity(t, "contact_resistance", units.ContactResistance); ok {
				if !(r >= 0) {
					l.rangeErr(t.keyPath("contact_resistance"), t.m["contact_resistance"], "contact_resistance must not be negative")
				}
				d.geom.ContactResistance = r
			}
		}
	}
	return out, len(l.errs) == before
}

// meshOptions reads [mesh].
func (l *loader) meshOptions(root *table) mesh.Options {
	var opt mesh.Options
	t := l.sub(root, "mesh", meshKeys, nil)
	if t == nil {
		return opt
	}
	if h, ok := l.quantity(t, "max_cell", units.Length); ok {
		if !(h > 0) {
			l.rangeErr(t.keyPath("max_cell"), t.m["max_cell"], "max_cell must be positive")
		}
		opt.MaxCell = h
	}
	if g, ok := l.number(t, "growth"); ok {
		if !(g >= 1) {
			l.rangeErr(t.keyPath("growth"), g, "growth is a ratio of neighbouring cell sizes and must be at least 1")
		}
		opt.Growth = g
	}
	return opt
}

// checkCells reports a mesh too large to hold, before it is built.
func (l *loader) checkCells(layers []layerDef, opt mesh.Options) bool {
	total, most, biggest := 0.0, 0.0, 0
	for j, d := range layers {
		n := float64(d.geom.Cells)
		if d.geom.Cells <= 0 {
			maxCell := opt.MaxCell
			if maxCell <= 0 {
				maxCell = mesh.DefaultMaxCell
			}
			n = max(4, math.Ceil(d.geom.Thickness/maxCell))
		}
		total += n
		if n > most {
			most, biggest = n, j
		}
	}
	if total <= maxCells {
		return true
	}
	// Point at what asks for the cells: [mesh] max_cell when the case sets
	// it, else the layer with the most cells (its cells or thickness).
	key := "mesh.max_cell"
	at := l.loc.Value(key)
	if at.Line == 0 {
		key = fmt.Sprintf("layer.%d.cells", biggest)
		if at = l.loc.Value(key); at.Line == 0 {
			key = fmt.Sprintf("layer.%d.thickness", biggest)
			at = l.loc.Value(key)
		}
	}
	l.add(at, key, ErrRange, nil, fmt.Sprintf("the mesh would have %.0f cells; at most %d", total, maxCells)).Hint =
		"give a larger [mesh] max_cell or fewer cells per layer"
	return false
}

// initial reads [initial]: the temperature (required) and cure.
func (l *loader) initial(root *table) (T, cure float64, ok bool) {
	if !root.has("initial") {
		l.errs = append(l.errs, &Error{File: l.file, Key: "initial",
			Err:  &detail{Kind: ErrMissing, Msg: "missing section [initial] with the initial temperature"},
			Hint: "add, for example:\n[initial]\ntemperature = \"23 C\""})
		return 0, 0, false
	}
	t := l.open("initial", root.m["initial"], initialKeys, nil)
	if t == nil || !l.require(t, "temperature") {
		return 0, 0, false
	}
	T, ok = l.quantity(t, "temperature", units.Temperature)
	if c, has := l.number(t, "cure"); has {
		if !(c >= 0 && c < 1) {
			l.rangeErr(t.keyPath("cure"), c, "the initial cure must be in [0, 1)")
			ok = false
		}
		cure = c
	}
	return T, cure, ok
}

// timing reads [time] into p. programEnd is the end of the longest
// program the case uses (0 if none, negative when unknown because of other
// errors); T0 the initial temperature (0 when unknown). It sets End, OutputTimes, MaxStep, the tolerances and the abort
// temperature, and returns the output interval.
func (l *loader) timing(root *table, p *solver.Problem, programEnd, T0 float64) (every float64) {
	t := l.sub(root, "time", timeKeys, nil)
	if t == nil {
		t = &table{path: "time", m: map[string]any{}}
	}
	positive := func(key string, d units.Dim) (float64, bool) {
		x, ok := l.quantity(t, key, d)
		if ok && !(x > 0) {
			l.rangeErr(t.keyPath(key), t.m[key], "%s must be positive", key)
			return 0, false
		}
		return x, ok
	}
	end, hasEnd := positive("end", units.Time)
	if !t.has("end") {
		if programEnd > 0 {
			end, hasEnd = programEnd, true
		} else if programEnd == 0 {
			e := l.add(l.loc.Table("time"), "time.end", ErrMissing, nil,
				"time.end is required: the case uses no schedule (or flux points) whose end could set it")
			e.Hint = "add, for example:\n[time]\nend = \"5 h\""
		}
	}
	every, hasEvery := positive("output_every", units.Time)
	p.MaxStep, _ = positive("max_step", units.Time)
	p.TemperatureTolerance, _ = positive("temperature_tolerance", units.TemperatureDifference)
	if c, ok := l.number(t, "cure_tolerance"); ok {
		if !(c > 0 && c < 1) {
			l.rangeErr(t.keyPath("cure_tolerance"), c, "cure_tolerance must be in (0, 1)")
		}
		p.CureTolerance = c
	}
	p.AbortTemperature = solver.DefaultAbortTemperature
	if a, ok := l.quantity(t, "abort_temperature", units.Temperature); ok {
		if T0 > 0 && !(a > T0) {
			l.rangeErr(t.keyPath("abort_temperature"), t.m["abort_temperature"], "abort_temperature must be above the initial temperature (%s)", Celsius(T0))
		}
		p.AbortTemperature = a
	} else if T0 >= p.AbortTemperature {
		at := "initial.temperature"
		l.add(l.loc.Value(at), at, ErrRange, nil, fmt.Sprintf("the initial temperature %s is at or above the runaway limit %s (the default of time.abort_temperature)",
			Celsius(T0), Celsius(p.AbortTemperature))).Hint = "set [time] abort_temperature above the initial temperature, for example abort_temperature = \"500 C\""
	}
	if !hasEnd {
		return 0
	}
	p.End = end
	if !t.has("output_every") {
		every, hasEvery = end/100, true
	}
	if !hasEvery {
		return 0
	}
	if n := end / every; n > maxOutputTimes {
		l.rangeErr(t.keyPath("output_every"), t.m["output_every"], "output_every gives %.3g snapshots over %g s; at most %d", n, end, maxOutputTimes)
		return 0
	}
	p.OutputTimes = outputTimes(end, every)
	return every
}

// outputTimes returns every, 2·every, ... below end, then end itself.
func outputTimes(end, every float64) []float64 {
	var times []float64
	for k := 1; ; k++ {
		t := float64(k) * every
		if t >= end*(1-1e-12) {
			break
		}
		times = append(times, t)
	}
	return append(times, end)
}

// probes reads [output] probes: depths in [0, total], at most maxProbes;
// it returns the key path of each depth returned too.
func (l *loader) probes(root *table, total float64) ([]float64, []string) {
	t := l.sub(root, "output", outputKeys, nil)
	if t == nil {
		return nil, nil
	}
	arr, ok := l.array(t, "probes")
	if !ok {
		return nil, nil
	}
	if len(arr) > maxProbes {
		l.atValue("output.probes", ErrRange, "%d probes: at most %d are allowed (each adds two columns to probes.csv and a curve to the report)", len(arr), maxProbes).Hint =
			"keep the depths you will read; fields.csv holds every cell at every output time"
		return nil, nil
	}
	out := make([]float64, 0, len(arr))
	var paths []string
	for i, v := range arr {
		path := fmt.Sprintf("output.probes.%d", i)
		z, ok := l.quantityAt(path, v, units.Length)
		if !ok {
			continue
		}
		switch {
		case z < 0:
			l.rangeErr(path, v, "a probe depth must not be negative (depth 0 is the top face)")
		case total > 0 && z > total*(1+1e-12):
			l.rangeErr(path, v, "the probe lies below the stack, which is %g mm thick", total*1e3)
		default:
			out = append(out, min(z, total))
			paths = append(paths, path)
		}
	}
	return out, paths
}

// criteria reads [criteria]; unset values are NaN.
func (l *loader) criteria(root *table) Criteria {
	c := Criteria{MinCure: math.NaN(), MaxTemperature: math.NaN(), MaxSpread: math.NaN()}
	t := l.sub(root, "criteria", criteriaKeys, nil)
	if t == nil {
		return c
	}
	if x, ok := l.number(t, "min_cure"); ok {
		if !(x > 0 && x <= 1) {
			l.rangeErr(t.keyPath("min_cure"), x, "min_cure must be in (0, 1]")
		}
		c.MinCure = x
	}
	if x, ok := l.quantity(t, "max_temperature", units.Temperature); ok {
		c.MaxTemperature = x
	}
	if x, ok := l.quantity(t, "max_spread", units.TemperatureDifference); ok {
		if !(x > 0) {
			l.rangeErr(t.keyPath("max_spread"), t.m["max_spread"], "max_spread must be positive")
		}
		c.MaxSpread = x
	}
	if x, ok := l.quantity(t, "flow_viscosity", units.Viscosity); ok {
		if !(x > 0) {
			l.rangeErr(t.keyPath("flow_viscosity"), t.m["flow_viscosity"], "flow_viscosity must be positive")
		}
		c.FlowViscosity = x
	}
	if x, ok := l.quantity(t, "min_flow_window", units.Time); ok {
		if !(x > 0) {
			l.rangeErr(t.keyPath("min_flow_window"), t.m["min_flow_window"], "min_flow_window must be positive")
		}
		c.MinFlowWindow = x
	}
	return c
}

// checkFlowCriteria reports flow criteria in a case whose layers have no
// viscosity law: there is nothing to judge them on.
func (l *loader) checkFlowCriteria(root *table, layers []layerDef) {
	for _, d := range layers {
		if d.mat != nil && d.mat.Viscosity != nil && d.mat.Cure != nil {
			return
		}
	}
	m, _ := root.m["criteria"].(map[string]any) // [criteria] itself was checked by criteria
	t := &table{path: "criteria", m: m}
	for _, k := range []string{"flow_viscosity", "min_flow_window"} {
		if t.has(k) {
			l.atKey(t.keyPath(k), ErrRange, "%s needs a layer whose material has a [materials.NAME.viscosity] section", k)
		}
	}
}
