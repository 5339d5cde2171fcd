// Package dsc turns differential scanning calorimetry (DSC) scans of a
// curing resin into kinetic parameters: baseline subtraction, integration to
// the total heat and the degree of cure α(t), detection of the temperature
// program (constant heating rate or isothermal), peak finding, the
// activation energy by Kissinger (ASTM E698) and Ozawa–Flynn–Wall (ASTM
// E1641, with the iterated Doyle factor), Friedman's isoconversional
// activation energy E(α), and a Levenberg–Marquardt least-squares fit of the
// n-th order or autocatalytic (Kamal–Sourour) law, optionally with the
// Chern–Poehlein diffusion factor, to all scans at once. Synthesize makes
// synthetic scans from a known cure law, for tests and example data.
//
// It is pure numerics: it reads and writes no files (package cases reads
// scan CSV files and formats the report).
//
// The methods follow the recommendations of the ICTAC Kinetics Committee
// (Vyazovkin et al., Thermochim. Acta 520:1, 2011): several temperature
// programs, isoconversional estimates first, a model fitted to all scans
// together, never to a single heating rate. Analyze applies them and says
// in its warnings where the data fall short.
//
// # Invariants
//
//   - Every quantity is in SI units: times in s, temperatures in K, heating
//     rates in K/s, heat flow in W/kg (per mass of sample), heats in J/kg,
//     activation energies in J/mol, rate constants in 1/s.
//   - Heat flow is positive for an exotherm.
//   - A Scan's times are strictly increasing; NewScan checks it and every
//     other function assumes it.
//   - Functions do not modify the scans they are given.
package dsc
