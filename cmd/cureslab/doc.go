// Command cureslab simulates heat and cure through the thickness of a curing
// thermoset part: bond lines, potting, coatings and laminates cured in ovens,
// on platens, under lamps or by volumetric (microwave or dielectric) heating
// under closed-loop control.
//
// Usage:
//
//	cureslab COMMAND [ARGS]
//
// Run 'cureslab help' for the list of commands and 'cureslab help COMMAND'
// for one of them. Results go to stdout or to files; diagnostics go to
// stderr. Exit status: 0 ran and every criterion met, 1 a criterion failed,
// 2 bad input or usage, 3 runaway or numerical failure (outputs kept).
package main
