// Package physics holds the material and boundary laws of cureslab as pure
// functions of state: conductivity and specific heat as functions of
// temperature and degree of cure, cure kinetics and their partial
// derivatives, the glass transition, face heat-flux laws, and temperature
// programs (schedules). It knows nothing of time stepping or files.
//
// # Invariants
//
//   - Every quantity is in SI units: temperatures in kelvin, times in
//     seconds, lengths in metres, energies in joules.
//   - Degree of cure α is dimensionless and lies in [0, 1]; every rate is
//     zero at α = 1.
//   - Heat flux at a face is positive into the part.
//   - Constructors (NewTable, NewSchedule, FromSegments, ...) validate their
//     input and return an error; the evaluation methods assume a valid value
//     and never allocate.
package physics
