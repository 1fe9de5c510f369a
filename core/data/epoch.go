package data

import (
	"fmt"
	"math"
	"strings"
)

// Epoch cuts r at every event whose Type is eventType. Each epoch runs from
// start to end seconds around the event onset; both bounds and the onset are
// rounded to the nearest sample, so every epoch shares one time axis with
// sample k at time round(start·rate)/rate + k/rate. Epochs that run past the
// recording are dropped and counted in the returned Epochs' Notes.
//
// events may be nil, in which case r.Events is used.
func Epoch(r *Recording, events []Event, eventType string, start, end float64) (*Epochs, error) {
	if events == nil {
		events = r.Events
	}
	const limit = 1e7 // s; far beyond any recording, small enough to round safely
	if math.IsNaN(start) || math.IsNaN(end) || math.Abs(start) > limit || math.Abs(end) > limit {
		return nil, fmt.Errorf("epochs: start %g s and end %g s must be finite times within ±%g s", start, end, limit)
	}
	if !(end > start) {
		return nil, fmt.Errorf("epochs: end %g s is not after start %g s", end, start)
	}
	if r.Rate <= 0 || len(r.Samples) == 0 && !(r.Streamed() && len(r.Channels) > 0) {
		return nil, fmt.Errorf("epochs: %s: recording has no samples", r.Name)
	}
	s0 := int(math.Round(start * r.Rate))
	s1 := int(math.Round(end * r.Rate))
	ns := s1 - s0 + 1
	n := r.Len()
	var keep []Event
	var onsets []int
	matched, dropped := 0, 0
	for _, ev := range events {
		if ev.Type != eventType {
			continue
		}
		matched++
		if math.IsNaN(ev.Onset) || math.Abs(ev.Onset-r.Start) > limit {
			dropped++ // an onset that cannot lie in the recording
			continue
		}
		e := int(math.Round((ev.Onset - r.Start) * r.Rate))
		if e+s0 < 0 || e+s1 >= n {
			dropped++
			continue
		}
		keep = append(keep, ev)
		onsets = append(onsets, e)
	}
	if matched == 0 {
		var types []string
		for _, tc := range EventTypes(events) {
			types = append(types, fmt.Sprintf("%q (%d)", tc.Type, tc.Count))
		}
		if len(types) == 0 {
			return nil, fmt.Errorf("epochs.event: %s has no events", r.Name)
		}
		return nil, fmt.Errorf("epochs.event: no event %q in %s; events there are: %s", eventType, r.Name, strings.Join(types, ", "))
	}
	if len(keep) == 0 {
		return nil, fmt.Errorf("epochs: all %d %q epochs of %s run past the recording", matched, eventType, r.Name)
	}
	if err := CheckSamples(int64(len(keep)) * int64(len(r.Channels)) * int64(ns)); err != nil {
		return nil, fmt.Errorf("epochs: %d epochs of %s: %w", len(keep), r.Name, err)
	}
	ep := NewEpochs(r.Rate, float64(s0)/r.Rate, r.Channels, len(keep), ns)
	ep.Name, ep.Format = r.Name, r.Format
	ep.TrialInfo = keep
	ep.Notes = append(ep.Notes, r.Notes...)
	var dst [][]float32
	var all []int
	if r.Streamed() {
		dst, all = make([][]float32, len(r.Channels)), make([]int, len(r.Channels))
		for c := range all {
			all[c] = c
		}
	}
	for t, e := range onsets {
		if r.Streamed() {
			// one read of every channel per epoch
			for c := range dst {
				dst[c] = ep.Trial(t, c)
			}
			if err := r.Source.Read(dst, all, e+s0); err != nil {
				return nil, err
			}
			continue
		}
		for c := range r.Channels {
			copy(ep.Trial(t, c), r.Samples[c][e+s0:e+s1+1])
		}
	}
	ep.Notes = append(ep.Notes, fmt.Sprintf("%d of %d %q epochs kept, %d dropped (past the recording)", len(keep), matched, eventType, dropped))
	return ep, nil
}
