// Package recipe is the analysis recipe as data: its types (Recipe,
// Spectral, EpochSpec, Window, Analysis, Figures), their defaults, Parse,
// and validation with field positions. It imports no engine: checking a
// recipe against a recording, planning and running it are core/analysis's
// work, and opening the recording is core/dataset's.
//
// A recipe is JSON. Unknown keys are errors, so a typo is never ignored, and
// every error names the field it concerns, e.g.
//
//	analyses[0].seed.freq: no grid frequency lies in [41, 45] Hz (grid 2–40 Hz)
//
// FieldError carries that field path; Errorf makes one, for the packages
// that refuse a recipe because it does not fit the data. The files:
// recipe.go (the types and Parse) and jsonwalk.go (a JSON walk that keeps
// line and column positions and refuses unknown keys).
package recipe
