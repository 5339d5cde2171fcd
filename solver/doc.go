// Package solver owns time: the coupled heat–cure time stepper, its Newton
// iteration, step-size control, the energy ledger and the events of a run
// (gelation, peak, runaway). It never parses and never formats.
//
// # Method
//
// Cell-centred finite volumes on the layered mesh; face conductances from
// the neighbouring half-cells in series plus any contact resistance.
// Crank–Nicolson in time (θ = ½) with fully implicit (θ = 1) start-up steps
// after t = 0; the cure equation uses the same trapezoidal rule. At every step
// the coupled equations for T and α are solved by Newton's method with the
// cure unknown of each cell eliminated locally, so each iteration is one
// tridiagonal solve (tridiag.go). Problems whose heat residual is linear in
// T take one exact update per step with factors reused while the step size
// repeats. See DEVELOPERS.md for the equations.
//
// # Invariants
//
//   - SI units: temperatures in K, times in s, depths in m.
//   - Arrays are indexed by cell, top to bottom, as in package mesh.
//   - Energies in the ledger are per unit face area (J/m²).
//   - A stepper owns all its buffers (from a Workspace when one is given);
//     stepping allocates nothing.
//   - Run keeps every snapshot in the Result (memory ∝ cells × output
//     times); RunStream hands each one to a Sink as it is produced and
//     reuses its slices (memory ∝ cells), for writers that stream the
//     fields to disk.
package solver
