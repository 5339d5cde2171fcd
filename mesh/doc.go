// Package mesh builds the layered, cell-centred, non-uniform 1-D grid through
// the thickness of a part. It knows geometry only.
//
// # Invariants
//
//   - Lengths are in metres; depth z = 0 is the top face and z grows downward.
//   - Cells and faces are indexed top to bottom: cell i lies between faces i
//     and i+1, so a mesh of n cells has n+1 faces.
//   - Every cell belongs to exactly one layer; layer j owns cells
//     First[j] ≤ i < First[j+1].
//   - The widths of a layer's cells add up to its thickness (to round-off).
package mesh
