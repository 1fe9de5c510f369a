package data

import (
	"errors"
	"fmt"
	"math"
)

// MaxRate is the highest sample rate amplink accepts: 1 MHz. EEG, MEG and
// LFP amplifiers sample at up to some tens of kHz, and sound cards at up to
// 768 kHz (common practice), so a faster rate comes from a broken header or
// time column, not from a recording. Refusing it also keeps a wavelet's
// length, which grows with the rate, from exceeding any buffer.
const MaxRate = 1e6

// ErrRate says a sample rate is not one a recording can have.
var ErrRate = errors.New("impossible sample rate")

// CheckRate returns an error wrapping ErrRate unless rate is a finite
// number above 0 and at most MaxRate Hz.
func CheckRate(rate float64) error {
	switch {
	case math.IsNaN(rate) || math.IsInf(rate, 0) || rate <= 0:
		return fmt.Errorf("sample rate %v Hz is not a positive number: %w", rate, ErrRate)
	case rate > MaxRate:
		return fmt.Errorf("sample rate %.6g Hz is above the limit of 1 MHz; no EEG, MEG, LFP or sound-card recording is sampled that fast (amplifiers sample at up to tens of kHz, sound cards at up to 768 kHz), so the header or time axis is wrong: %w", rate, ErrRate)
	}
	return nil
}
