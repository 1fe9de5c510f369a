package app

import (
	"fmt"
	"strings"

	"amplink/core/recipe"
)

// Questions says, for each analysis of a recipe, the question it asks in
// words: the results table's group headings.
func Questions(recipeJSON []byte) map[string]string {
	r, err := recipe.Parse(recipeJSON)
	if err != nil {
		return nil
	}
	out := map[string]string{}
	for _, a := range r.Analyses {
		out[a.ID] = Question(a)
	}
	return out
}

func chans(c []string) string {
	if len(c) == 1 && c[0] == "*" {
		return "every channel"
	}
	return strings.Join(c, ", ")
}

func band(f [2]float64) string { return fmt.Sprintf("%g–%g Hz", f[0], f[1]) }

func window(w *recipe.Window) string {
	return fmt.Sprintf("%s %s power at %g to %g s", chans(w.Channel), band(w.Freq), w.Time[0], w.Time[1])
}

// Question is one analysis's question in words.
func Question(a recipe.Analysis) string {
	var q string
	switch a.Type {
	case recipe.TypeTrialWindow:
		q = fmt.Sprintf("Across trials, does %s rise and fall with %s?", window(a.Seed), window(a.Target))
		if len(a.Covariates) > 0 {
			q += " After removing " + strings.Join(a.Covariates, ", ") + "."
		}
		if a.Conditions != nil {
			q += fmt.Sprintf(" Compared between %s = %s and %s.", a.Conditions.Column, a.Conditions.Compare[0], a.Conditions.Compare[1])
		}
	case recipe.TypeTFMap:
		q = fmt.Sprintf("Where in time and frequency (%g to %g s, %s) does the power of %s follow %s across trials?",
			a.Target.Time[0], a.Target.Time[1], band(a.Target.Freq), chans(a.Target.Channel), window(a.Seed))
	case recipe.TypeEnvelope:
		f := "the band"
		if a.Freq != nil {
			f = band(*a.Freq)
		}
		if a.TargetFreq != nil {
			q = fmt.Sprintf("Over time, does the %s envelope of %s rise and fall with their %s envelope?", f, chans(a.Channels), band(*a.TargetFreq))
		} else {
			q = fmt.Sprintf("Over time, do the %s amplitude envelopes of %s rise and fall together?", f, chans(a.Channels))
		}
		if a.Orthogonalize != recipe.OrthNone {
			q += " Leakage-corrected (zero-lag coupling removed)."
		}
	case recipe.TypeComodulogram:
		q = fmt.Sprintf("Which pairs of frequencies of %s have envelopes that co-vary over time?", chans(a.Channels))
	default:
		q = a.Type
	}
	return q
}
