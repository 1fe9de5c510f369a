package data

import (
	"errors"
	"slices"
	"testing"
)

// memSource streams a held recording's samples, counting the samples read.
type memSource struct {
	r    *Recording
	read int
	fail bool
}

func (m *memSource) Read(dst [][]float32, chans []int, lo int) error {
	if m.fail {
		return errors.New("ramp.edf: offset 256: read failed")
	}
	for i, c := range chans {
		m.read += copy(dst[i], m.r.Samples[c][lo:])
	}
	return nil
}

// streamedRamp is ramp with its samples behind a Source.
func streamedRamp(nch, n int, evs []Event) (*Recording, *memSource) {
	held := ramp(100, 0, nch, n, evs)
	src := &memSource{r: held}
	s := *held
	s.Samples, s.Source, s.N = nil, src, n
	return &s, src
}

func TestStreamedRecording(t *testing.T) {
	s, src := streamedRamp(4, 500, nil)
	if !s.Streamed() || s.Len() != 500 || s.Duration() != 5 {
		t.Fatalf("streamed %v, %d samples, %g s", s.Streamed(), s.Len(), s.Duration())
	}
	dst := [][]float32{make([]float32, 3), make([]float32, 3)}
	if err := s.Block(dst, []int{3, 1}, 10); err != nil {
		t.Fatal(err)
	}
	// ramp: sample k of channel c is 1000·c + k
	if !slices.Equal(dst[0], []float32{3010, 3011, 3012}) || !slices.Equal(dst[1], []float32{1010, 1011, 1012}) || src.read != 6 {
		t.Errorf("Block: %v, %v after %d samples read", dst[0], dst[1], src.read)
	}
	// dropping channels 0 and 2 renumbers the source's channels
	s.Keep([]int{3, 1})
	if err := s.Block(dst[:1], []int{1}, 0); err != nil || !slices.Equal(dst[0], []float32{1000, 1001, 1002}) {
		t.Errorf("after Keep: %v, %v", dst[0], err)
	}
	if s.Channels[0].Name != "C3" || s.Channels[1].Name != "C1" {
		t.Errorf("after Keep: channels %v", Names(s.Channels))
	}
}

// TestEpochFromStream: epochs cut from a streamed recording equal those cut
// from the held one, and a read error is returned, not panicked.
func TestEpochFromStream(t *testing.T) {
	evs := []Event{ev(0.5, "go"), ev(1.25, "go"), ev(4.5, "go"), ev(4.99, "go")}
	want, err := Epoch(ramp(100, 0, 3, 500, evs), nil, "go", -0.2, 0.3)
	if err != nil {
		t.Fatal(err)
	}
	s, src := streamedRamp(3, 500, evs)
	got, err := Epoch(s, nil, "go", -0.2, 0.3)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(got.Data, want.Data) || got.NTrials != 3 || !slices.Equal(got.Notes, want.Notes) {
		t.Errorf("streamed epochs: %d trials, notes %v; held: %d, %v", got.NTrials, got.Notes, want.NTrials, want.Notes)
	}
	if src.read != len(want.Data) {
		t.Errorf("%d samples read for %d epoch samples", src.read, len(want.Data))
	}
	src.fail = true
	if _, err := Epoch(s, nil, "go", -0.2, 0.3); err == nil {
		t.Error("a failing read gave no error")
	}
}
