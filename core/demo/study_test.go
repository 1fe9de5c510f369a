package demo

import (
	"math"
	"slices"
	"testing"

	"amplink/core/data"
)

// The study's design: 6 + 6 participants, each a session of the scenario
// kept to StudyChannels, and the planted coupling only in the coupled
// group (checked on the simulation's own trial amplitudes, so without any
// analysis: the Pz delta burst's log amplitude against C4's beta burst).
func TestStudyDesign(t *testing.T) {
	ps := Participants()
	n := map[string]int{}
	for _, p := range ps {
		n[p.Group]++
	}
	if len(ps) != StudyParticipants || n[StudyGroupCoupled] != StudyParticipants/2 || n[StudyGroupUncoupled] != StudyParticipants/2 {
		t.Fatalf("groups %v", n)
	}
	for _, p := range ps[:2] {
		r := StudyRecording(p)
		if !slices.Equal(data.Names(r.Channels), StudyChannels) || len(r.Events) != StudyTones || len(r.Samples) != len(StudyChannels) {
			t.Fatalf("%s: channels %v, %d events", p.Label, data.Names(r.Channels), len(r.Events))
		}
		// Burst amplitude per tone: the Hann-windowed Fourier amplitude of C4
		// in [−0.6, 0] s near 20 Hz and of Pz in [0.1, 1.0] s at 2.5 Hz, whose
		// logs share the planted correlation (less the background noise's share).
		c4, pz := slices.Index(StudyChannels, "C4"), slices.Index(StudyChannels, "Pz")
		var x, y []float64
		for _, ev := range r.Events {
			b := 0.0
			for _, f := range []float64{19, 20, 21} {
				b = max(b, amp(r.Samples[c4], ev.Onset-0.6, ev.Onset, f))
			}
			x = append(x, math.Log(b))
			y = append(y, math.Log(amp(r.Samples[pz], ev.Onset+0.1, ev.Onset+1.0, 2.5)))
		}
		c := corr(x, y)
		t.Logf("%s (%s): corr of log burst amplitudes = %.3f", p.Label, p.Group, c)
		if p.Group == StudyGroupCoupled && c < 0.2 || p.Group == StudyGroupUncoupled && math.Abs(c) > 0.3 {
			t.Errorf("%s (%s): log-amplitude correlation %.3f does not match the plan", p.Label, p.Group, c)
		}
	}
}

// amp is |Σ w(t)·x(t)·exp(−i2πft)| over [t0, t1) with a Hann window w.
func amp(s []float32, t0, t1, f float64) float64 {
	i0, i1 := int(math.Round(t0*Rate)), int(math.Round(t1*Rate))
	var re, im float64
	for i := i0; i < i1; i++ {
		w := 0.5 - 0.5*math.Cos(2*math.Pi*float64(i-i0)/float64(i1-i0))
		ph := 2 * math.Pi * f * float64(i) / Rate
		re += w * float64(s[i]) * math.Cos(ph)
		im -= w * float64(s[i]) * math.Sin(ph)
	}
	return math.Hypot(re, im)
}

func corr(x, y []float64) float64 {
	var mx, my float64
	for i := range x {
		mx += x[i]
		my += y[i]
	}
	mx /= float64(len(x))
	my /= float64(len(y))
	var sxy, sxx, syy float64
	for i := range x {
		sxy += (x[i] - mx) * (y[i] - my)
		sxx += (x[i] - mx) * (x[i] - mx)
		syy += (y[i] - my) * (y[i] - my)
	}
	return sxy / math.Sqrt(sxx*syy)
}
