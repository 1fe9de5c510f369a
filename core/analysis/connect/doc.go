// Package connect holds the numerical kernels of the analyses in
// core/analysis: functions of sample slices that know nothing of recipes.
//
// Trial-window analysis: for each trial, a window's power is the mean of
// |x∗w_f|² over the grid frequencies f inside the window's band and the
// samples inside its time span, with x∗w_f the 'same'-aligned linear
// convolution of the trial with the amplitude-normalised Morlet wavelet at f.
// Seed and target window powers are then correlated across trials.
//
// Envelope analysis: amplitude envelopes of band-limited analytic signals
// are correlated over time, plain or orthogonalised against zero-lag leakage.
package connect
