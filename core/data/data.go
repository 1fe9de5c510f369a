package data

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// Channel describes one signal.
type Channel struct {
	Name  string // the name used in recipes, e.g. "Fz"
	Label string // the label as stored in the file, e.g. "EEG Fz-Ref"; may be empty or equal to Name
	Type  string // e.g. "EEG", "MEG", "LFP", "AUDIO"; may be empty
	Unit  string // physical unit, e.g. "uV"; may be empty
}

// Event marks something that happened during a recording.
type Event struct {
	Onset    float64           // seconds from the start of the recording
	Duration float64           // seconds; 0 when unknown
	Type     string            // trial_type, or the annotation text
	Extra    map[string]string // further columns (covariates, conditions); may be nil
}

// Recording is continuous data: Samples[c] holds channel c. A streamed
// recording (a reader's Open) has no Samples: N samples per channel are
// read on demand from Source (stream.go).
type Recording struct {
	Name     string // file name, used in messages
	Format   string // detected format name
	Rate     float64
	Start    float64 // time of sample 0, in seconds
	Channels []Channel
	Samples  [][]float32
	Source   Source // streamed: where the samples are read; nil when they are held
	N        int    // streamed: samples per channel
	Events   []Event
	Notes    []string // what the reader set aside or changed, for the user
}

// Epochs is data cut into trials of equal length. Data is laid out
// [trial][channel][sample] in one slice.
type Epochs struct {
	Name      string
	Format    string
	Rate      float64
	Start     float64 // time of sample 0 relative to the event, in seconds
	Channels  []Channel
	NTrials   int
	NSamples  int
	Data      []float32
	TrialInfo []Event  // one per trial when known (type and extra columns); may be nil
	Notes     []string // what the reader or epoching set aside, for the user
}

// NewEpochs allocates zeroed epochs.
func NewEpochs(rate, start float64, channels []Channel, trials, samples int) *Epochs {
	return &Epochs{
		Rate: rate, Start: start, Channels: channels,
		NTrials: trials, NSamples: samples,
		Data: make([]float32, trials*len(channels)*samples),
	}
}

// Trial returns the samples of trial t, channel c (a view, not a copy).
func (e *Epochs) Trial(t, c int) []float32 {
	n := e.NSamples
	off := (t*len(e.Channels) + c) * n
	return e.Data[off : off+n : off+n]
}

// Time returns the time in seconds of sample k: Start + k/Rate.
func (e *Epochs) Time(k int) float64 { return e.Start + float64(k)/e.Rate }

// End returns the time of the last sample.
func (e *Epochs) End() float64 { return e.Time(e.NSamples - 1) }

// Sample returns the index of the sample nearest to time t (not clamped).
func (e *Epochs) Sample(t float64) int { return int(math.Round((t - e.Start) * e.Rate)) }

// Validate checks the internal consistency of e.
func (e *Epochs) Validate() error {
	switch {
	case e.Rate <= 0 || math.IsNaN(e.Rate) || math.IsInf(e.Rate, 0):
		return fmt.Errorf("data: sample rate %v is not positive", e.Rate)
	case len(e.Channels) == 0:
		return fmt.Errorf("data: no channels")
	case e.NTrials <= 0 || e.NSamples <= 0:
		return fmt.Errorf("data: %d trials of %d samples", e.NTrials, e.NSamples)
	case len(e.Data) != e.NTrials*len(e.Channels)*e.NSamples:
		return fmt.Errorf("data: %d values for %d×%d×%d", len(e.Data), e.NTrials, len(e.Channels), e.NSamples)
	case e.TrialInfo != nil && len(e.TrialInfo) != e.NTrials:
		return fmt.Errorf("data: %d trial records for %d trials", len(e.TrialInfo), e.NTrials)
	}
	return nil
}

// Duration returns the length of the recording in seconds.
func (r *Recording) Duration() float64 {
	if r.Rate <= 0 {
		return 0
	}
	return float64(r.Len()) / r.Rate
}

// Len returns the number of samples per channel.
func (r *Recording) Len() int {
	if r.Streamed() {
		return r.N
	}
	if len(r.Samples) == 0 {
		return 0
	}
	return len(r.Samples[0])
}

// ShortName strips a type prefix and a reference suffix from a stored label,
// so "EEG Fz-Ref", "EEG Fz" and "Fz" all give "Fz". The rule: take the last
// space-separated word, then cut at the first '-' unless that leaves nothing.
func ShortName(label string) string {
	s := strings.TrimSpace(label)
	if i := strings.LastIndexByte(s, ' '); i >= 0 {
		s = s[i+1:]
	}
	if i := strings.IndexByte(s, '-'); i > 0 {
		s = s[:i]
	}
	return s
}

// Lookup finds channels by name. It matches, in order: the exact name, the
// exact stored label, then the ShortName of the label, all case-insensitively
// for the last step. It returns -1 when nothing matches.
func Lookup(chs []Channel, name string) int {
	if name == "" {
		return -1
	}
	for i, c := range chs {
		if c.Name == name {
			return i
		}
	}
	for i, c := range chs {
		if c.Label != "" && c.Label == name {
			return i
		}
	}
	for i, c := range chs {
		if strings.EqualFold(c.Name, name) || strings.EqualFold(ShortName(c.Label), name) {
			return i
		}
	}
	return -1
}

// Names lists the channel names, for messages.
func Names(chs []Channel) []string {
	out := make([]string, len(chs))
	for i, c := range chs {
		out[i] = c.Name
	}
	return out
}

// EventTypes counts events by type, sorted by name.
func EventTypes(evs []Event) []TypeCount {
	m := map[string]int{}
	for _, e := range evs {
		m[e.Type]++
	}
	out := make([]TypeCount, 0, len(m))
	for k, v := range m {
		out = append(out, TypeCount{k, v})
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Type < out[j].Type })
	return out
}

// TypeCount is one entry of EventTypes.
type TypeCount struct {
	Type  string
	Count int
}
