// Package cases is the only part of cureslab that touches files and text:
// case files in (TOML with units, strictly validated), CSV/JSON/HTML out,
// embedded examples, and the drivers that call solver.Run.
//
// # Invariants
//
//   - A Case is validated and converted to SI once, by Load; everything
//     downstream trusts it.
//   - Every user-facing error carries the file, line, column and key path
//     (type Error), and several are reported together (type ErrorList).
//   - No output file is ever half-written: each is written to a temporary
//     file in the target directory and renamed after a successful close.
package cases
