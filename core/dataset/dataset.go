package dataset

import (
	"errors"
	"fmt"
	"path"
	"strings"

	"amplink/core/data"
	"amplink/core/format"
	"amplink/core/format/bids"
	"amplink/core/format/csv"
	"amplink/core/recipe"
)

// Dataset is one recording ready for analysis: the continuous recording when
// the input was continuous, and the epochs when the input was epoched or the
// recipe cut it.
type Dataset struct {
	Name      string
	Format    string
	Recording *data.Recording
	Epochs    *data.Epochs
	Notes     []string
	// Electrodes places the channels on the head (electrodes.go); nil
	// means the built-in positions.
	Electrodes *Electrodes
}

// Open decodes f (any registered format, found by its magic bytes), pairs it
// with events, drops channels marked bad in a channels.tsv, and cuts epochs
// when the recipe asks for them.
//
// Events come from events (a BIDS events.tsv) when it is not nil, otherwise
// from a sibling "<stem>_events.tsv", otherwise from the file itself (EDF+
// annotations). A sibling "<stem>_channels.tsv" marks bad channels and, for
// audio files whose channels are unnamed, names them in order. For epoched
// or epoched-by-the-recipe input, a sibling "<stem>_trials.csv" or
// "<stem>_trials.tsv" (trial,<name>...) adds per-trial
// values for covariates and conditions, matched by trial id (after
// epoching, the 1-based number of the kept epoch).
//
// A continuous recording in a format that streams (format.Open) is not
// held: its samples are read from f when they are needed, so f must stay
// readable while the dataset is used.
func Open(r *recipe.Recipe, f format.File, events *format.File, sib format.Siblings) (*Dataset, error) {
	if sib == nil {
		sib = format.NoSiblings{}
	}
	// Continuous formats that can stream (EDF, BDF, …) keep their samples
	// in f: the envelope analyses read them a chunk at a time, and epoching
	// reads each epoch.
	d, err := format.Open(f, sib)
	if err != nil {
		return nil, err
	}
	ds := &Dataset{Name: f.Name}
	chans := func() []data.Channel {
		if d.Recording != nil {
			return d.Recording.Channels
		}
		return d.Epochs.Channels
	}
	if ct, err := openSibling(sib, f.Name, "_channels.tsv"); err == nil {
		infos, err := bids.ReadChannels(ct)
		if err != nil {
			return nil, err
		}
		if err := applyChannels(d, chans(), infos, ct.Name, ds); err != nil {
			return nil, err
		}
	} else if !errors.Is(err, format.ErrNoSibling) {
		return nil, err
	}
	if d.Recording != nil {
		rec := d.Recording
		ds.Format = rec.Format
		if events != nil {
			evs, err := bids.ReadEvents(*events)
			if err != nil {
				return nil, err
			}
			rec.Events = evs
			ds.Notes = append(ds.Notes, fmt.Sprintf("%d events from %s", len(evs), events.Name))
		} else if et, err := openSibling(sib, f.Name, "_events.tsv"); err == nil {
			evs, err := bids.ReadEvents(et)
			if err != nil {
				return nil, err
			}
			rec.Events = evs
			ds.Notes = append(ds.Notes, fmt.Sprintf("%d events from %s", len(evs), et.Name))
		} else if !errors.Is(err, format.ErrNoSibling) {
			return nil, err
		}
		ds.Recording = rec
		if r != nil && r.Epochs != nil {
			ep, err := data.Epoch(rec, nil, r.Epochs.Event, r.Epochs.Start, r.Epochs.End)
			if err != nil {
				return nil, err
			}
			ds.Epochs = ep
		}
		ds.Notes = append(rec.Notes, ds.Notes...)
		if ds.Epochs != nil {
			ds.Notes = append(ds.Notes, ds.Epochs.Notes[len(ds.Epochs.Notes)-1])
		}
	} else {
		ds.Epochs = d.Epochs
		ds.Format = d.Epochs.Format
		ds.Notes = append(d.Epochs.Notes, ds.Notes...)

		if r != nil && r.Epochs != nil {
			ds.Notes = append(ds.Notes, "the input is already epoched, so the recipe's epochs block is not used")
		}
		if events != nil {
			ds.Notes = append(ds.Notes, "the input is already epoched, so "+events.Name+" is not used")
		}
	}
	if err := ds.openElectrodes(sib, f.Name); err != nil {
		return nil, err
	}
	if ds.Epochs != nil {
		tf, err := openSibling(sib, f.Name, "_trials.csv")
		if errors.Is(err, format.ErrNoSibling) {
			tf, err = openSibling(sib, f.Name, "_trials.tsv")
		}
		if err == nil {
			t, err := csv.DecodeTrials(tf)
			if err != nil {
				return nil, err
			}
			if err := ds.AttachTrials(t, tf.Name); err != nil {
				return nil, err
			}
		} else if !errors.Is(err, format.ErrNoSibling) {
			return nil, err
		}
	}
	return ds, nil
}

// Stem returns the file name without its extension and without a trailing
// BIDS modality suffix such as "_eeg".
func Stem(name string) string {
	base := path.Base(strings.ReplaceAll(name, "\\", "/"))
	if i := strings.LastIndexByte(base, '.'); i > 0 {
		base = base[:i]
	}
	for _, suf := range []string{"_eeg", "_meg", "_ieeg"} {
		if strings.HasSuffix(base, suf) {
			return strings.TrimSuffix(base, suf)
		}
	}
	return base
}

func openSibling(sib format.Siblings, name, suffix string) (format.File, error) {
	stem := Stem(name)
	f, err := sib.Open(stem + suffix)
	if err == nil || !errors.Is(err, format.ErrNoSibling) {
		return f, err
	}
	return sib.Open(stem + strings.Replace(suffix, "_", ".", 1))
}

// applyChannels names unnamed audio channels and drops bad ones.
func applyChannels(d *format.Data, chans []data.Channel, infos []bids.ChannelInfo, file string, ds *Dataset) error {
	unnamed := len(chans) > 0
	for i, c := range chans {
		if c.Name != fmt.Sprintf("ch%d", i+1) {
			unnamed = false
		}
	}
	if unnamed {
		if len(infos) != len(chans) {
			return fmt.Errorf("%s: lists %d channels but the recording has %d", file, len(infos), len(chans))
		}
		for i := range chans {
			chans[i].Label = chans[i].Name
			chans[i].Name = infos[i].Name
			if infos[i].Type != "" {
				chans[i].Type = infos[i].Type
			}
		}
		ds.Notes = append(ds.Notes, fmt.Sprintf("channel names from %s", file))
	}
	var bad []int
	var badNames []string
	for _, name := range bids.Bad(infos) {
		if i := data.Lookup(chans, name); i >= 0 {
			bad = append(bad, i)
			badNames = append(badNames, chans[i].Name)
		}
	}
	if len(bad) == 0 {
		return nil
	}
	if len(bad) == len(chans) {
		return fmt.Errorf("%s: every channel is marked bad", file)
	}
	drop := map[int]bool{}
	for _, i := range bad {
		drop[i] = true
	}
	if d.Recording != nil {
		rec := d.Recording
		var keep []int
		for i := range rec.Channels {
			if !drop[i] {
				keep = append(keep, i)
			}
		}
		rec.Keep(keep)
	} else {
		e := d.Epochs
		var keep []int
		for i := range e.Channels {
			if !drop[i] {
				keep = append(keep, i)
			}
		}
		d.Epochs = SubsetEpochs(e, keep)
	}
	ds.Notes = append(ds.Notes, fmt.Sprintf("excluded %d bad channel(s) marked in %s: %s", len(bad), file, strings.Join(badNames, ", ")))
	return nil
}

// SubsetEpochs copies the listed channels of e into new epochs.
func SubsetEpochs(e *data.Epochs, chans []int) *data.Epochs {
	cs := make([]data.Channel, len(chans))
	for i, c := range chans {
		cs[i] = e.Channels[c]
	}
	out := data.NewEpochs(e.Rate, e.Start, cs, e.NTrials, e.NSamples)
	out.Name, out.Format, out.TrialInfo, out.Notes = e.Name, e.Format, e.TrialInfo, e.Notes
	for t := 0; t < e.NTrials; t++ {
		for i, c := range chans {
			copy(out.Trial(t, i), e.Trial(t, c))
		}
	}
	return out
}

// Summary describes a dataset for people.
type Summary struct {
	Name     string           `json:"name"`
	Format   string           `json:"format"`
	Channels []string         `json:"channels"`
	Rate     float64          `json:"rate"`
	Duration float64          `json:"duration,omitempty"` // s, continuous input
	Trials   int              `json:"trials,omitempty"`
	Epoch    [2]float64       `json:"epoch,omitempty"` // s, first and last sample time
	Events   []data.TypeCount `json:"events,omitempty"`
	Notes    []string         `json:"notes,omitempty"`
}

// Describe summarises ds.
func Describe(ds *Dataset) Summary {
	s := Summary{Name: ds.Name, Format: ds.Format, Notes: ds.Notes}
	if ds.Recording != nil {
		s.Channels = data.Names(ds.Recording.Channels)
		s.Rate = ds.Recording.Rate
		s.Duration = ds.Recording.Duration()
		s.Events = data.EventTypes(ds.Recording.Events)
	}
	if e := ds.Epochs; e != nil {
		s.Channels = data.Names(e.Channels)
		s.Rate = e.Rate
		s.Trials = e.NTrials
		s.Epoch = [2]float64{e.Start, e.End()}
		if ds.Recording == nil && e.TrialInfo != nil {
			s.Events = data.EventTypes(e.TrialInfo)
		}
	}
	return s
}
