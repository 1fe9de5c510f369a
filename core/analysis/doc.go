// Package analysis runs a recipe on a dataset: NewPlan checks the recipe
// against the data and splits the work into independent units, Compute runs
// one unit and returns plain numbers (so units can run on goroutines or in
// Web Workers), and Finish combines every unit's result into the rows and
// maps of the results table. Figures are drawn from those results
// afterwards, by core/figures; core/pipeline joins the two.
//
// One file per analysis type, each with its planning, its units and its
// combining: trialwindow.go (trial-window: window power across trials,
// correlated seed against target, with covariates, conditions and their
// tests), tfmap.go (tf-map: the seed window against every target pixel,
// with the cluster test), envelope.go (envelope: amplitude or log-power
// envelopes over time, plain or orthogonalised, same band or across bands;
// its unit computation in envunits.go and its surrogate p-values in
// envsurrogates.go) and comodulogram.go (the cross-frequency map, planned
// and computed as envelopes).
// plan.go holds what they share (the grid, the wavelet bank, window spans,
// the unit list), trials.go the per-trial covariates and conditions, and
// views.go what figures read of a finished plan.
//
// The numerical kernels (window power, per-trial pixel power, band signals,
// orthogonalisation, running co-moments) stay a package of their own,
// analysis/connect, under this folder: they are functions of slices that
// know nothing of recipes, are tested against numpy and scipy and
// benchmarked alone, and are what the analyses here are built from.
package analysis
