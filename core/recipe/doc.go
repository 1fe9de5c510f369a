// Package recipe parses and validates an analysis recipe, plans the minimum
// work it needs, and runs it.
//
// A recipe is JSON. Unknown keys are errors, so a typo is never ignored, and
// every error names the field it concerns, e.g.
//
//	analyses[0].seed.freq: no grid frequency lies in [41, 45] Hz (grid 2–40 Hz)
//
// The work is split into independent units (one channel's windows, or one
// channel pair's envelopes). Run executes them on goroutines; the page hands
// them to Web Workers through NewPlan, Plan.Compute and Plan.Finish.
package recipe
