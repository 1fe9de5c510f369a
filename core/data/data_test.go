package data

import (
	"math"
	"slices"
	"strings"
	"testing"
)

func TestShortName(t *testing.T) {
	cases := []struct{ in, want string }{
		{"EEG Fz-Ref", "Fz"},
		{"EEG Fz", "Fz"},
		{"Fz", "Fz"},
		{"-x", "-x"}, // a cut at position 0 would leave nothing
		{"", ""},
		{"  EEG Cz  ", "Cz"},      // surrounding space is trimmed first
		{"EEG  Cz", "Cz"},         // last word after a double space
		{"MEG 0113", "0113"},      // numeric names stay
		{"EEG C3-A2-x", "C3"},     // cut at the first '-'
		{"Fp1-", "Fp1"},           // trailing '-'
		{"EEG -x", "-x"},          // the last word starts with '-'
		{"ECG", "ECG"},            // a single word is the name
		{"EEG O1-REF", "O1"},      // upper-case reference
		{"POL DC01 -Ref", "-Ref"}, // last word only; documents the rule
	}
	for _, c := range cases {
		t.Run(c.in, func(t *testing.T) {
			if got := ShortName(c.in); got != c.want {
				t.Errorf("ShortName(%q) = %q, want %q", c.in, got, c.want)
			}
		})
	}
}

func TestLookup(t *testing.T) {
	cases := []struct {
		name  string
		chs   []Channel
		query string
		want  int
	}{
		{"exact name", []Channel{{Name: "Fz"}, {Name: "Cz"}}, "Cz", 1},
		{"missing", []Channel{{Name: "Fz"}, {Name: "Cz"}}, "Pz", -1},
		{"no channels", nil, "Fz", -1},
		{"exact name beats earlier case-insensitive name",
			[]Channel{{Name: "fz"}, {Name: "Fz"}}, "Fz", 1},
		{"exact name beats earlier label",
			[]Channel{{Name: "A", Label: "Cz"}, {Name: "Cz"}}, "Cz", 1},
		{"exact label beats earlier case-insensitive name",
			[]Channel{{Name: "eeg cz"}, {Name: "B", Label: "EEG Cz"}}, "EEG Cz", 1},
		{"exact label beats earlier short name",
			[]Channel{{Name: "X", Label: "EEG Cz-Ref"}, {Name: "Y", Label: "Cz"}}, "Cz", 1},
		{"label", []Channel{{Name: "ch1", Label: "EEG Fz-Ref"}}, "EEG Fz-Ref", 0},
		{"short name of the label", []Channel{{Name: "ch1", Label: "EEG Fz-Ref"}}, "Fz", 0},
		{"short name case-insensitive", []Channel{{Name: "ch1", Label: "EEG Fz-Ref"}}, "FZ", 0},
		{"name case-insensitive", []Channel{{Name: "Oz"}}, "oz", 0},
		{"label is case-sensitive in step 2", []Channel{{Name: "ch1", Label: "EEG Fz"}}, "eeg fz", -1},
		{"last step in channel order",
			[]Channel{{Name: "ch1", Label: "EEG Cz"}, {Name: "CZ"}}, "cz", 0},
		{"empty label is not matched exactly", []Channel{{Name: "A"}, {Name: "B", Label: ""}}, "", -1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := Lookup(c.chs, c.query); got != c.want {
				t.Errorf("Lookup(%q) = %d, want %d", c.query, got, c.want)
			}
		})
	}
}

func TestValidate(t *testing.T) {
	good := func() *Epochs {
		return NewEpochs(250, -0.2, []Channel{{Name: "A"}, {Name: "B"}}, 3, 10)
	}
	cases := []struct {
		name   string
		modify func(e *Epochs)
		want   string // substring of the error; "" for none
	}{
		{"valid", func(e *Epochs) {}, ""},
		{"valid with trial info", func(e *Epochs) { e.TrialInfo = make([]Event, 3) }, ""},
		{"zero rate", func(e *Epochs) { e.Rate = 0 }, "sample rate 0 is not positive"},
		{"negative rate", func(e *Epochs) { e.Rate = -1 }, "sample rate -1"},
		{"NaN rate", func(e *Epochs) { e.Rate = math.NaN() }, "sample rate NaN"},
		{"Inf rate", func(e *Epochs) { e.Rate = math.Inf(1) }, "sample rate +Inf"},
		{"no channels", func(e *Epochs) { e.Channels = nil }, "no channels"},
		{"no trials", func(e *Epochs) { e.NTrials = 0 }, "0 trials of 10 samples"},
		{"no samples", func(e *Epochs) { e.NSamples = 0 }, "3 trials of 0 samples"},
		{"negative trials", func(e *Epochs) { e.NTrials = -1 }, "-1 trials"},
		{"short data", func(e *Epochs) { e.Data = e.Data[:59] }, "59 values for 3×2×10"},
		{"long data", func(e *Epochs) { e.Data = append(e.Data, 0) }, "61 values for 3×2×10"},
		{"trial info count", func(e *Epochs) { e.TrialInfo = make([]Event, 2) }, "2 trial records for 3 trials"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e := good()
			c.modify(e)
			err := e.Validate()
			switch {
			case c.want == "" && err != nil:
				t.Errorf("unexpected error %v", err)
			case c.want != "" && err == nil:
				t.Errorf("no error, want %q", c.want)
			case c.want != "" && !strings.Contains(err.Error(), c.want):
				t.Errorf("error %q does not contain %q", err, c.want)
			case err != nil && !strings.HasPrefix(err.Error(), "data: "):
				t.Errorf("error %q lacks the package prefix", err)
			}
		})
	}
}

// Trial is a view into Data laid out [trial][channel][sample]: writes go
// through, and appending cannot spill into the next channel's samples.
func TestTrialView(t *testing.T) {
	const nt, nc, ns = 3, 2, 4
	e := NewEpochs(100, 0, []Channel{{Name: "A"}, {Name: "B"}}, nt, ns)
	if len(e.Data) != nt*nc*ns {
		t.Fatalf("len(Data) = %d", len(e.Data))
	}
	cases := []struct{ tr, ch int }{{0, 0}, {0, 1}, {1, 0}, {2, 1}}
	for _, c := range cases {
		t.Run("", func(t *testing.T) {
			x := e.Trial(c.tr, c.ch)
			if len(x) != ns || cap(x) != ns {
				t.Fatalf("len %d cap %d, want %d", len(x), cap(x), ns)
			}
			v := float32(10*c.tr + c.ch + 1)
			for k := range x {
				x[k] = v + float32(k)/10
			}
			off := (c.tr*nc + c.ch) * ns
			for k := range ns {
				if got, want := e.Data[off+k], v+float32(k)/10; got != want {
					t.Errorf("Data[%d] = %v, want %v", off+k, got, want)
				}
			}
			next := off + ns
			var before float32
			if next < len(e.Data) {
				before = e.Data[next]
			}
			_ = append(x, -99)
			if next < len(e.Data) && e.Data[next] != before {
				t.Errorf("append through Trial overwrote Data[%d]", next)
			}
		})
	}
}

func TestEventTypes(t *testing.T) {
	cases := []struct {
		name string
		evs  []Event
		want []TypeCount
	}{
		{"none", nil, []TypeCount{}},
		{"sorted with counts", []Event{{Type: "tone"}, {Type: "b"}, {Type: "tone"}, {Type: ""}, {Type: "a"}},
			[]TypeCount{{"", 1}, {"a", 1}, {"b", 1}, {"tone", 2}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := EventTypes(c.evs); !slices.Equal(got, c.want) {
				t.Errorf("EventTypes = %v, want %v", got, c.want)
			}
		})
	}
}

func TestRecordingSize(t *testing.T) {
	cases := []struct {
		name    string
		r       Recording
		wantLen int
		wantDur float64
	}{
		{"empty", Recording{Rate: 100}, 0, 0},
		{"no rate", Recording{Samples: [][]float32{make([]float32, 50)}}, 50, 0},
		{"250 samples at 100 Hz", Recording{Rate: 100, Samples: [][]float32{make([]float32, 250), make([]float32, 250)}}, 250, 2.5},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := c.r.Len(); got != c.wantLen {
				t.Errorf("Len = %d, want %d", got, c.wantLen)
			}
			if got := c.r.Duration(); got != c.wantDur {
				t.Errorf("Duration = %v, want %v", got, c.wantDur)
			}
		})
	}
}

func TestNames(t *testing.T) {
	chs := []Channel{{Name: "Fz", Label: "EEG Fz"}, {Name: "Cz"}}
	if got := Names(chs); !slices.Equal(got, []string{"Fz", "Cz"}) {
		t.Errorf("Names = %q", got)
	}
	if got := Names(nil); len(got) != 0 {
		t.Errorf("Names(nil) = %q", got)
	}
}
