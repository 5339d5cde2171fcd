package cases

import (
	"cureslab/physics"
	"cureslab/solver"
)

// Case is a validated case file resolved to SI units, ready to run.
type Case struct {
	File  string // path as given by the user ("<name>" for embedded text)
	Dir   string // directory that relative paths in the case refer to
	Title string

	// Problem is the resolved model handed to solver.Run.
	Problem *solver.Problem

	Layers    []LayerInfo                  // one per [[layer]], top to bottom
	Materials map[string]*physics.Material // every material the layers use, by name
	Schedules map[string]physics.Schedule  // every [schedules.X], by name
	// Replaced lists built-in material names that a [materials.X] of this
	// case overrides (check reports them).
	Replaced []string

	OutputEvery float64 // s
	Criteria    Criteria
	Probes      []float64 // probe depths as given, m (also in Problem.Probes)

	TopAir, BottomAir string // what drives each face as written ("oven", "23 C"), "" if none

	// Volumetric describes [volumetric] as written, nil without one; the
	// resolved heating is Problem.Volumetric.
	Volumetric *VolumetricInfo

	// Notes says, one sentence each, what a sweep or an uncertainty sample
	// changed in the case beyond its values (a probe below a thinner stack
	// left out); empty for a case loaded from its file.
	Notes []string
}

// LayerInfo is one layer as the user described it.
type LayerInfo struct {
	Name     string
	Material string // material name as written
	// Builtin reports that the material came from the built-in library.
	Builtin bool
}

// Criteria are the optional acceptance criteria of [criteria]; a NaN field
// is not set.
type Criteria struct {
	MinCure        float64 // every curing cell at the end, (0, 1]
	MaxTemperature float64 // K, anywhere, any time
	MaxSpread      float64 // K, inside curing layers, any time
	// FlowViscosity is the viscosity below which a resin counts as flowing
	// (flow_window_s), Pa·s; 0 means the default, 100 Pa·s.
	FlowViscosity float64
	MinFlowWindow float64 // s, the shortest flow window allowed; 0 means not set
}

// Controlled reports whether p's volumetric heating is under closed-loop
// control (probes.csv then has a power_fraction column).
func Controlled(p *solver.Problem) bool {
	return p.Volumetric != nil && p.Volumetric.Control != nil
}

// Viscous reports whether a layer of p has a material with a viscosity law
// (and a cure section): fields.csv then has a viscosity_Pa_s column,
// probes.csv a viscosity column per probe, and summary.json the minimum
// viscosity and the flow window.
func Viscous(p *solver.Problem) bool {
	for _, m := range p.Materials {
		if m != nil && m.Viscosity != nil && m.Cure != nil {
			return true
		}
	}
	return false
}
