package app

import "testing"

// TestWords: recipe errors in the form's words, counted from 1, with the
// JSON path kept apart for the small print.
func TestWords(t *testing.T) {
	cases := []struct{ msg, words, path string }{
		{"analyses[3].seed.freq: the 2 Hz wavelet is longer than the epoch", "Analysis 4, seed band: the 2 Hz wavelet is longer than the epoch", "analyses[3].seed.freq"},
		{"analyses[0].seed: is required", "Analysis 1, seed window: is required", "analyses[0].seed"},
		{"analyses[1].target.time[1]: 3 s is past the epoch end", "Analysis 2, target to: 3 s is past the epoch end", "analyses[1].target.time[1]"},
		{"epochs.event: is required (the event type to cut at)", "Epochs, event type: is required (the event type to cut at)", "epochs.event"},
		{"spectral.high: 300 Hz is at or above the Nyquist frequency", "Highest frequency: 300 Hz is at or above the Nyquist frequency", "spectral.high"},
		{"analyses[2].conditions.compare[1]: \"miss\" has 2 usable trials", "Analysis 3, with level: \"miss\" has 2 usable trials", "analyses[2].conditions.compare[1]"},
		{"x.csv:2:3: \"abc\" is not a number", "x.csv:2:3: \"abc\" is not a number", ""},
		{"analyses[4]: same id as analyses[0]", "Analysis 5: same id as analysis 1", "analyses[4]"},
	}
	for _, c := range cases {
		w, p := Words(c.msg)
		if w != c.words || p != c.path {
			t.Errorf("Words(%q) = %q, %q; want %q, %q", c.msg, w, p, c.words, c.path)
		}
	}
}
