package data

import (
	"fmt"
	"math"
	"strings"
	"testing"
)

// ramp returns a recording whose channel c holds sample k as the value
// 1000·c + k, so that every copied sample names its own source index.
func ramp(rate, start float64, nch, n int, evs []Event) *Recording {
	r := &Recording{Name: "ramp.edf", Format: "edf", Rate: rate, Start: start, Events: evs}
	for c := range nch {
		r.Channels = append(r.Channels, Channel{Name: fmt.Sprintf("C%d", c)})
		s := make([]float32, n)
		for k := range s {
			s[k] = float32(1000*c + k)
		}
		r.Samples = append(r.Samples, s)
	}
	return r
}

func ev(onset float64, typ string) Event { return Event{Onset: onset, Type: typ} }

func TestEpoch(t *testing.T) {
	type trial struct {
		first float32 // value of sample 0 of channel 0, i.e. its source index
	}
	cases := []struct {
		name         string
		rate, rstart float64
		n            int
		events       []Event // passed to Epoch; nil means r.Events
		recEvents    []Event
		typ          string
		start, end   float64
		wantStart    float64 // time of sample 0: round(start·rate)/rate
		wantNS       int
		wantFirst    []float32 // first sample of each kept trial, channel 0
		wantNote     string
	}{
		{
			// start −0.104 s → round(−10.4) = −10; end 0.206 → round(20.6) = 21;
			// onset 1.234 s → sample round(123.4) = 123; 32 samples from 113.
			name: "rounding", rate: 100, n: 500,
			events: []Event{ev(1.234, "tone"), ev(2.0, "tone"), ev(3.0, "other")},
			typ:    "tone", start: -0.104, end: 0.206,
			wantStart: -0.1, wantNS: 32, wantFirst: []float32{113, 190},
			wantNote: `2 of 2 "tone" epochs kept, 0 dropped (past the recording)`,
		},
		{
			// onset 1.236 s → round(123.6) = 124.
			name: "onset rounds up", rate: 100, n: 500,
			events: []Event{ev(1.236, "tone")},
			typ:    "tone", start: 0, end: 0.1,
			wantStart: 0, wantNS: 11, wantFirst: []float32{124},
			wantNote: `1 of 1 "tone" epochs kept, 0 dropped (past the recording)`,
		},
		{
			// The recording starts at 10 s, so onset 11 s is sample 100.
			name: "recording start offset", rate: 100, rstart: 10, n: 300,
			events: []Event{ev(11, "go")},
			typ:    "go", start: -0.5, end: 0.5,
			wantStart: -0.5, wantNS: 101, wantFirst: []float32{50},
			wantNote: `1 of 1 "go" epochs kept, 0 dropped (past the recording)`,
		},
		{
			// 256 Hz: start −0.3 s → round(−76.8) = −77 → −77/256 s; end 0.3 s → 77.
			name: "time axis at 256 Hz", rate: 256, n: 1024,
			events: []Event{ev(2, "t")},
			typ:    "t", start: -0.3, end: 0.3,
			wantStart: -77.0 / 256, wantNS: 155, wantFirst: []float32{512 - 77},
			wantNote: `1 of 1 "t" epochs kept, 0 dropped (past the recording)`,
		},
		{
			// n = 100 samples, epochs of samples [e−10, e+10]. Onset 0.10 s
			// (e = 10) touches sample 0 and is kept; 0.09 s (e = 9) needs −1.
			// Onset 0.89 s (e = 89) ends at sample 99 and is kept; 0.90 s needs 100.
			name: "edges", rate: 100, n: 100,
			events: []Event{ev(0.09, "s"), ev(0.10, "s"), ev(0.5, "x"), ev(0.89, "s"), ev(0.90, "s")},
			typ:    "s", start: -0.1, end: 0.1,
			wantStart: -0.1, wantNS: 21, wantFirst: []float32{0, 79},
			wantNote: `2 of 4 "s" epochs kept, 2 dropped (past the recording)`,
		},
		{
			name: "nil events use the recording's", rate: 100, n: 200,
			recEvents: []Event{ev(1, "a"), ev(0.5, "a")},
			typ:       "a", start: 0, end: 0.05,
			wantStart: 0, wantNS: 6, wantFirst: []float32{100, 50},
			wantNote: `2 of 2 "a" epochs kept, 0 dropped (past the recording)`,
		},
		{
			name: "explicit events override the recording's", rate: 100, n: 200,
			recEvents: []Event{ev(1, "a")},
			events:    []Event{ev(0.3, "a")},
			typ:       "a", start: 0, end: 0.05,
			wantStart: 0, wantNS: 6, wantFirst: []float32{30},
			wantNote: `1 of 1 "a" epochs kept, 0 dropped (past the recording)`,
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := ramp(c.rate, c.rstart, 2, c.n, c.recEvents)
			r.Notes = []string{"reader note"}
			ep, err := Epoch(r, c.events, c.typ, c.start, c.end)
			if err != nil {
				t.Fatal(err)
			}
			if err := ep.Validate(); err != nil {
				t.Fatalf("Validate: %v", err)
			}
			if ep.Start != c.wantStart {
				t.Errorf("Start = %v, want %v", ep.Start, c.wantStart)
			}
			if ep.NSamples != c.wantNS {
				t.Errorf("NSamples = %d, want %d", ep.NSamples, c.wantNS)
			}
			if ep.NTrials != len(c.wantFirst) || len(ep.TrialInfo) != len(c.wantFirst) {
				t.Fatalf("NTrials = %d, TrialInfo %d, want %d", ep.NTrials, len(ep.TrialInfo), len(c.wantFirst))
			}
			if ep.Name != r.Name || ep.Format != r.Format || ep.Rate != r.Rate {
				t.Errorf("Name/Format/Rate = %q/%q/%v", ep.Name, ep.Format, ep.Rate)
			}
			for tr, first := range c.wantFirst {
				for ch := range 2 {
					x := ep.Trial(tr, ch)
					for k, v := range x {
						if want := float32(1000*ch) + first + float32(k); v != want {
							t.Fatalf("trial %d channel %d sample %d = %v, want %v", tr, ch, k, v, want)
						}
					}
				}
				if ep.TrialInfo[tr].Type != c.typ {
					t.Errorf("TrialInfo[%d].Type = %q", tr, ep.TrialInfo[tr].Type)
				}
			}
			if len(ep.Notes) != 2 || ep.Notes[0] != "reader note" || ep.Notes[1] != c.wantNote {
				t.Errorf("Notes = %q, want [reader note, %q]", ep.Notes, c.wantNote)
			}
			// Time axis: sample k at round(start·rate)/rate + k/rate.
			for _, k := range []int{0, 1, ep.NSamples - 1} {
				want := math.Round(c.start*c.rate)/c.rate + float64(k)/c.rate
				if got := ep.Time(k); math.Abs(got-want) > 1e-12 {
					t.Errorf("Time(%d) = %v, want %v", k, got, want)
				}
				if got := ep.Sample(ep.Time(k)); got != k {
					t.Errorf("Sample(Time(%d)) = %d", k, got)
				}
			}
			if got, want := ep.End(), ep.Time(ep.NSamples-1); got != want {
				t.Errorf("End = %v, want %v", got, want)
			}
		})
	}
}

// The epochs are a copy: writing to the recording afterwards leaves them alone.
func TestEpochCopies(t *testing.T) {
	r := ramp(100, 0, 1, 100, []Event{ev(0.5, "a")})
	ep, err := Epoch(r, nil, "a", 0, 0.1)
	if err != nil {
		t.Fatal(err)
	}
	r.Samples[0][50] = -1
	if got := ep.Trial(0, 0)[0]; got != 50 {
		t.Errorf("epoch sample changed with the recording: %v", got)
	}
}

func TestEpochErrors(t *testing.T) {
	cases := []struct {
		name       string
		rec        *Recording
		events     []Event
		typ        string
		start, end float64
		want       []string // substrings of the error
	}{
		{
			name:   "unknown type lists types with counts",
			rec:    ramp(100, 0, 1, 100, nil),
			events: []Event{ev(0.2, "tone"), ev(0.3, "noise"), ev(0.4, "tone"), ev(0.5, "a b")},
			typ:    "tones", start: 0, end: 0.1,
			want: []string{"epochs.event", `"tones"`, "ramp.edf", `"a b" (1), "noise" (1), "tone" (2)`},
		},
		{
			name: "no events at all", rec: ramp(100, 0, 1, 100, nil),
			typ: "tone", start: 0, end: 0.1,
			want: []string{"epochs.event", "ramp.edf has no events"},
		},
		{
			name: "all dropped", rec: ramp(100, 0, 1, 100, nil),
			events: []Event{ev(0.05, "tone"), ev(0.95, "tone")},
			typ:    "tone", start: -0.1, end: 0.1,
			want: []string{`all 2 "tone" epochs`, "ramp.edf", "run past the recording"},
		},
		{
			name: "end before start", rec: ramp(100, 0, 1, 100, []Event{ev(0.5, "a")}),
			typ: "a", start: 0.2, end: 0.1,
			want: []string{"end 0.1 s is not after start 0.2 s"},
		},
		{
			name: "end equals start", rec: ramp(100, 0, 1, 100, []Event{ev(0.5, "a")}),
			typ: "a", start: 0.1, end: 0.1,
			want: []string{"not after start"},
		},
		{
			name: "NaN start", rec: ramp(100, 0, 1, 100, []Event{ev(0.5, "a")}),
			typ: "a", start: math.NaN(), end: 0.1,
			want: []string{"start NaN s and end 0.1 s must be finite"},
		},
		{
			name: "no samples", rec: &Recording{Name: "empty.csv", Rate: 100, Events: []Event{ev(0, "a")}},
			typ: "a", start: 0, end: 0.1,
			want: []string{"empty.csv", "no samples"},
		},
		{
			name: "zero rate", rec: &Recording{Name: "z.csv", Samples: [][]float32{{1, 2, 3}}, Events: []Event{ev(0, "a")}},
			typ: "a", start: 0, end: 0.1,
			want: []string{"z.csv", "no samples"},
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			ep, err := Epoch(c.rec, c.events, c.typ, c.start, c.end)
			if err == nil {
				t.Fatalf("no error; got %d trials", ep.NTrials)
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not contain %q", err, w)
				}
			}
		})
	}
}

// Onsets and bounds that do not fit in an int must give an error (or drop
// the epoch), never a panic: events come from files.
func TestEpochHugeValues(t *testing.T) {
	cases := []struct {
		name       string
		onset      float64
		start, end float64
	}{
		{"onset +Inf", math.Inf(1), -0.1, 0.1},
		{"onset -Inf", math.Inf(-1), -0.1, 0.1},
		{"onset NaN", math.NaN(), 0, 0.1},
		{"onset 1e300", 1e300, -0.1, 0.1},
		{"end 1e300", 0.5, -0.1, 1e300},
		{"end +Inf", 0.5, -0.1, math.Inf(1)},
		{"start -1e300", 0.5, -1e300, 0.1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := ramp(100, 0, 1, 100, nil)
			evs := []Event{ev(c.onset, "a")}
			func() {
				defer func() {
					if p := recover(); p != nil {
						t.Errorf("Epoch panicked: %v", p)
					}
				}()
				ep, err := Epoch(r, evs, "a", c.start, c.end)
				if err == nil {
					t.Errorf("no error; got %d trials of %d samples", ep.NTrials, ep.NSamples)
				}
			}()
		})
	}
}
