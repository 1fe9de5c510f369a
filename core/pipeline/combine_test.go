package pipeline

import (
	"math"
	"testing"

	"amplink/core/report"
)

func oneRecording(r float64) *report.Results {
	return &report.Results{
		Rows:     []report.Row{{Analysis: "a", Type: "envelope", Seed: "X", Target: "Y", Method: "pearson", N: 100, R: r, P: 0.01}},
		Maps:     []report.Map{{Name: "a_matrix"}},
		Figures:  []report.Figure{{Name: "a_matrix", SVG: "<svg/>"}},
		Warnings: []string{"a warning"},
	}
}

// Several recordings: names get the recording's stem, rows its file name,
// and the group row pools both (tanh of the mean Fisher z, Fisher 1921).
func TestCombined(t *testing.T) {
	c := NewCombined(2)
	c.Add("sub-01_task-x_eeg.edf", oneRecording(0.2))
	c.Add("sub-02_task-x_eeg.edf", oneRecording(0.4))
	if err := c.Group(nil, 0.95, false); err != nil {
		t.Fatal(err)
	}
	res := c.Results()
	if c.Recordings() != 2 || len(res.Rows) != 3 || res.Maps[1].Name != "sub-02_task-x_a_matrix" || res.Figures[0].Name != "sub-01_task-x_a_matrix" ||
		res.Warnings[1] != "sub-02_task-x_eeg.edf: a warning" || res.Rows[1].Recording() != "sub-02_task-x_eeg.edf" {
		t.Fatalf("combined %+v", res)
	}
	g := res.Rows[2]
	want := math.Tanh((math.Atanh(0.2) + math.Atanh(0.4)) / 2)
	if g.Recording() != report.GroupRecording || g.N != 2 || math.Abs(g.R-want) > 1e-15 {
		t.Errorf("group row %+v, want r %v over 2 recordings", g, want)
	}
	// One recording keeps its names.
	c = NewCombined(1)
	c.Add("sub-01_task-x_eeg.edf", oneRecording(0.2))
	if res := c.Results(); res.Maps[0].Name != "a_matrix" || res.Warnings[0] != "a warning" || res.Rows[0].Recording() != "sub-01_task-x_eeg.edf" {
		t.Errorf("one recording %+v", res)
	}
}
