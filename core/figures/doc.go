// Package figures chooses and draws the figures of a run, from its results
// after analysis.Plan.Finish (and from the dataset, for power maps). Every
// analysis draws what shows its result (names are safe file names; the CLI
// writes figures/<Name>.svg):
//
//   - trial-window and tf-map: <id>_tfpower_<channel>, the trial-averaged
//     power P(f, t) = (1/N) Σ_trials |x∗w_f|²(t) of each channel the analysis
//     reads (µV² for µV data), over the whole epoch and every grid frequency,
//     with the analysis's seed window drawn on its seed channels and its
//     target window on its target channels (each only where it applies);
//     a sanity view, with no normalisation of single trials;
//   - trial-window: <id>_scatter_<seed>_<target> for every row, or for the
//     figScatterMax rows with the largest |r| when there are more (one per
//     condition, suffixed _<condition>, when conditions are compared), the
//     trial values behind r: ranks for Spearman, and the residuals after the
//     covariates for a partial correlation;
//   - tf-map: <id>_tfcorr_<channel>, the r map with the clusters of cluster
//     p ≤ 0.05 outlined;
//   - envelope: <id>_matrix, the r matrix (with ≥ 3 channels, or any
//     cross-frequency analysis: seed band on the rows, target band on the
//     columns) and <id>_envelopes_<a>_<b>, the envelopes of the first pair
//     over a short stretch;
//   - comodulogram: <id>_comodulogram.
//
// The power maps are units of kind "tf-power" (one per channel, shared by
// the analyses), listed by Plan.Units so that they can be computed beside
// the analysis units, on any worker. A map costs one inverse FFT of the
// whole epoch per trial and grid frequency; on the demo one channel's map
// costs about half of all three trial-window analyses together, so maps are
// drawn for few channels: every seed channel and every target channel of an
// analysis whose side (seed or target) has at most figPowerTargets
// channels, and, for a side with more (such as "*"), the channels of that
// side with the figPowerTargets strongest rows (largest |r|, first in table
// order on ties). Those last maps can only be chosen once the rows exist, so
// Draw computes them (in parallel, on GOMAXPROCS goroutines) rather than as
// units.
//
// The files: figures.go (the plan, its units and Draw), power.go (power
// maps), scatter.go (trial scatters), envelope.go (matrices, comodulograms,
// envelope traces) and tfcorr.go (tf-map r maps).
package figures
