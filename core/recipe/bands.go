package recipe

import (
	"fmt"

	"amplink/core/spectral"
)

// CheckBands checks, from the recipe alone, that every band of every
// analysis holds at least one frequency of the recipe's grid, so that a
// caller can blame the recipe rather than the data it is applied to. analysis.NewPlan
// makes the same check (BandIndices) on the grid it builds; Parse does not,
// so that a recipe being edited field by field is not refused for a band
// that the next edit of the grid will fill.
func CheckBands(r *Recipe) error {
	sp := r.Spectral
	freqs, err := spectral.Frequencies(sp.Low, sp.High, sp.Steps, sp.Spacing)
	if err != nil {
		return ferr("spectral", "%v", err)
	}
	for i := range r.Analyses {
		a := &r.Analyses[i]
		path := fmt.Sprintf("analyses[%d]", i)
		check := func(field string, band *[2]float64) error {
			if band == nil {
				return nil
			}
			_, err := BandIndices(path+field, *band, freqs)
			return err
		}
		var err error
		switch a.Type {
		case TypeTrialWindow, TypeTFMap:
			if a.Seed != nil {
				err = check(".seed.freq", &a.Seed.Freq)
			}
			if err == nil && a.Target != nil {
				err = check(".target.freq", &a.Target.Freq)
			}
		case TypeEnvelope, TypeComodulogram:
			if err = check(".freq", a.Freq); err == nil {
				err = check(".targetFreq", a.TargetFreq)
			}
		}
		if err != nil {
			return err
		}
	}
	return nil
}

// BandIndices returns the indices of the grid frequencies inside band
// [lo, hi] Hz (inclusive, to a relative 1e-9), or an error for field path
// when there is none.
func BandIndices(path string, band [2]float64, freqs []float64) ([]int, error) {
	var idx []int
	for i, f := range freqs {
		if f >= band[0]*(1-1e-9) && f <= band[1]*(1+1e-9) {
			idx = append(idx, i)
		}
	}
	if len(idx) == 0 {
		return nil, ferr(path, "no grid frequency lies in [%g, %g] Hz (grid %.4g–%.4g Hz)", band[0], band[1], freqs[0], freqs[len(freqs)-1])
	}
	return idx, nil
}
