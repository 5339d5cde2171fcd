// Package reference holds closed-form solutions that the solver is tested
// against: transient conduction in a plane wall and a semi-infinite solid,
// isothermal cure kinetics, and the steady thermal-explosion limit of a slab.
//
// It is a test-only package: nothing in the command depends on it. Every
// function is an independent evaluation of a published formula (see the doc
// comment of each function), written without
// reference to the solver's discretisation, so that agreement between the two
// means something.
//
// # Invariants
//
//   - Results are dimensionless (θ, α) unless a unit is stated.
//   - Arguments outside a function's documented domain are programming
//     errors and panic; values on the edge of the domain (Fo = 0, Bi = 0,
//     Bi = +Inf, t = 0) are handled as their limits.
//   - Nothing allocates except PlaneWallEigen, which returns a new slice.
package reference
