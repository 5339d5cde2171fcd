// Package calibrate fits uncertain inputs of a case to the thermocouple
// readings of a trial: film coefficients, contact resistances, material
// properties, kinetic constants, any numeric value of the part or the
// process named by its key path, as in sweeps.
//
// ReadLog reads the measured log (the shape of a run's probes.csv) and
// refuses a bad one with positions; Calibrate runs the weighted
// least-squares fit (physics/lsq) with the case's values as the start, each
// evaluation one summary-only solver run at the log's depths and times;
// StageFiles stages calibrated.toml, calibration.csv and residuals.csv in an
// output set (package outdir, kind Kind), and Print writes the terminal
// summary. The report page is drawn by package report (CalibrationReport).
//
// # Invariants
//
//   - Temperatures are in K and times in s inside the package, depths in m;
//     the log's °C and mm are converted on reading.
//   - A free value is held in the unit the case writes it in (Param.Unit),
//     so that it goes back into the case text as written.
//   - Bad input (the case, the log, a --free) is refused before anything is
//     written; a fit that does not converge or is interrupted still gives a
//     Result, marked by its Status.
package calibrate
