// Package spectral holds the time-frequency engine of amplink: frequency and
// cycle grids, the amplitude-normalised complex Morlet wavelet, a bank of
// wavelets whose FFT spectra are cached per FFT length, and FFT convolution of
// real signals with the bank.
//
// The wavelet at frequency f (Hz) with n cycles, sampled at rate (Hz), is
//
//	w[k] = 2·exp(i·2π·f·t_k)·g(t_k) / Σ_j g(t_j),   g(t) = exp(−t²/(2σt²)),
//	σt = n/(2π·f) s,   t_k = (k−H)/rate s,   k = 0 … 2H,   H = ⌈Support·σt·rate⌉.
//
// With this normalisation a cosine of amplitude A (in the signal's unit, for
// example µV) at frequency f gives an analytic signal y = x∗w with |y| = A and
// power |y|² = A² (µV²) away from the edges, independent of f and the sample
// rate.
//
// Convolution is linear (never circular) and 'same'-aligned: output sample j
// of a signal x of length N is
//
//	y[j] = Σ_{k=0}^{2H} x[j+H−k]·w[k],   j = 0 … N−1,
//
// with x taken as zero outside [0, N). This equals
// scipy.signal.fftconvolve(x, w, mode='same').
//
// A Bank is built once per recipe and shared by all goroutines. Each goroutine
// makes its own Convolver for an FFT length, loads one trial or one cropped
// segment (one forward FFT), and then reads any number of frequencies from it
// (one inverse FFT each). A window analysis needs only the window plus the
// kernel support: Crop gives that segment, and a Convolver with Tight set
// reads the window from an FFT of about the segment's own length.
// Stream convolves long continuous channels block by
// block with memory independent of the signal length.
//
// The package is pure Go and builds for GOOS=js GOARCH=wasm.
package spectral
