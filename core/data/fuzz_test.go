package data

import (
	"math"
	"testing"
)

// FuzzEpoch: whatever the onsets and bounds, Epoch returns either an error
// or epochs that pass Validate and hold the recording's samples; it never
// panics. The seeds are the cases of TestEpoch. Out-of-range values
// (±Inf, 1e300) currently panic; see TestEpochHugeValues.
func FuzzEpoch(f *testing.F) {
	f.Add(100.0, 500, 1.234, 2.0, -0.104, 0.206)
	f.Add(100.0, 100, 0.09, 0.90, -0.1, 0.1)
	f.Add(256.0, 1024, 2.0, 0.0, -0.3, 0.3)
	f.Add(100.0, 100, 0.5, 0.5, 0.0, 0.0)
	f.Fuzz(func(t *testing.T, rate float64, n int, on1, on2, start, end float64) {
		if n < 0 || n > 1<<12 {
			return
		}
		r := ramp(rate, 0, 1, n, []Event{ev(on1, "a"), ev(on2, "a"), ev(0, "b")})
		ep, err := Epoch(r, nil, "a", start, end)
		if err != nil {
			return
		}
		if err := ep.Validate(); err != nil {
			t.Fatalf("Epoch gave invalid epochs: %v", err)
		}
		for tr := range ep.NTrials {
			x := ep.Trial(tr, 0)
			for k := 1; k < len(x); k++ {
				if x[k] != x[k-1]+1 {
					t.Fatalf("trial %d is not a contiguous run of samples: %v", tr, x)
				}
			}
			if math.Abs(float64(x[0])-math.Round(ep.TrialInfo[tr].Onset*rate)-math.Round(start*rate)) > 0.5 {
				t.Fatalf("trial %d starts at sample %v, onset %v", tr, x[0], ep.TrialInfo[tr].Onset)
			}
		}
	})
}
