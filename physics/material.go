package physics

// Material is a solid of the stack. Density is constant (README Case file reference, [materials.NAME]).
type Material struct {
	Name         string
	Density      float64 // kg/m³
	SpecificHeat Blend   // J/(kg·K)
	Conductivity Blend   // W/(m·K)
	Cure         *Cure   // nil for a material that does not cure
	Dielectric   *Dielectric
	// Viscosity is the resin's viscosity law, nil where none is given; it
	// needs Cure (its gel point ends the flow).
	Viscosity *CastroMacosko
	// Composition says how Mix made the material from a fibre and a resin;
	// nil for a material given directly.
	Composition *Composition
	// Source names where the values come from (a handbook table, a data
	// sheet, or "invented for the examples").
	Source string
}

// Dielectric holds the dielectric properties of an absorbing material at the
// working frequency. A material without one is transparent to volumetric
// heating: it absorbs nothing and attenuates nothing.
type Dielectric struct {
	Permittivity    float64 // relative permittivity ε′
	LossFactor      float64 // ε″ of the uncured material
	LossFactorCured float64 // ε″ at full cure (linear in α between)
	Shield          bool    // absorbs nothing and blocks the field beyond it
	// LossTable and LossTableCured, when set, make ε″ of the uncured and
	// cured material depend on temperature (piecewise linear, held beyond
	// the ends); LossFactor and LossFactorCured then hold their largest
	// values, for estimates.
	LossTable, LossTableCured *Property
}

// Composition records the constituents of a fibre/resin ply (see Mix).
type Composition struct {
	Fibre, Resin        string // names as given
	FibreVolumeFraction float64
	FibreMassFraction   float64
	Model               ConductivityModel // of the through-thickness conductivity
	FibreSource         string            // the fibre's Source
}
