package data

import (
	"errors"
	"fmt"
)

// MaxSampleBytes, when positive, is the most bytes of float32 samples one
// decode or one epoching may hold. Readers whose size is not already capped
// check it before they allocate (and, for text, as they grow) and fail with
// an error wrapping ErrTooLarge. The browser's analysis worker sets it,
// because a worker's memory is limited (wasm32 ends at 4 GiB, and running
// out is fatal); the command-line tool leaves it at 0, no limit.
var MaxSampleBytes int64

// ErrTooLarge says the samples would not fit in MaxSampleBytes.
var ErrTooLarge = errors.New("too large to hold here")

// CheckSamples returns an error wrapping ErrTooLarge when n samples
// (4 bytes each as float32) exceed MaxSampleBytes.
func CheckSamples(n int64) error {
	if MaxSampleBytes <= 0 || n <= MaxSampleBytes/4 {
		return nil
	}
	return fmt.Errorf("%d samples need %s as float32, more than the %s that may be held: %w",
		n, sizeText(4*n), sizeText(MaxSampleBytes), ErrTooLarge)
}

// sizeText prints a byte count in MiB (GiB from 10 GiB up), or in bytes
// below 1 MiB.
func sizeText(b int64) string {
	switch {
	case b >= 10<<30:
		return fmt.Sprintf("%.1f GiB", float64(b)/(1<<30))
	case b >= 1<<20:
		return fmt.Sprintf("%d MiB", b>>20)
	}
	return fmt.Sprintf("%d bytes", b)
}
