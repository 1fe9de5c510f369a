package recipe

import (
	"fmt"

	"amplink/core/spectral"
)

// CheckBands checks, from the recipe alone, that every band of every
// analysis holds at least one frequency of the recipe's grid, so that a
// caller can blame the recipe rather than the data it is applied to. NewPlan
// makes the same check (freqIndices) on the grid it builds; Parse does not,
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
			_, err := freqIndices(path+field, *band, freqs)
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
