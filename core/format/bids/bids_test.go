package bids

import (
	"bytes"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"amplink/core/data"
	"amplink/core/format"
)

const dir = "../../../testdata/bids"

func openTest(t testing.TB, name string) format.File {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, name))
	if err != nil {
		t.Fatal(err)
	}
	return format.Bytes(name, b)
}

type refEvent struct {
	Onset    float64           `json:"onset"`
	Duration float64           `json:"duration"`
	Type     string            `json:"type"`
	Extra    map[string]string `json:"extra"`
}

type refChannel struct {
	Name              string            `json:"name"`
	Type              string            `json:"type"`
	Units             string            `json:"units"`
	Status            string            `json:"status"`
	StatusDescription string            `json:"status_description"`
	Extra             map[string]string `json:"extra"`
}

// loadRef reads testdata/bids/ref.json: what Python 3.11's csv module and
// float() read from each valid fixture (testdata/bids/make_ref.py).
func loadRef(t *testing.T) (map[string][]refEvent, map[string][]refChannel) {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, "ref.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Python   string                  `json:"python"`
		Events   map[string][]refEvent   `json:"events"`
		Channels map[string][]refChannel `json:"channels"`
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if ref.Python == "" || len(ref.Events) == 0 || len(ref.Channels) == 0 {
		t.Fatal("ref.json is incomplete")
	}
	return ref.Events, ref.Channels
}

func nilIfEmpty(m map[string]string) map[string]string {
	if len(m) == 0 {
		return nil
	}
	return m
}

func TestReadEvents(t *testing.T) {
	evRef, _ := loadRef(t)
	for name, want := range evRef {
		t.Run(name, func(t *testing.T) {
			got, err := ReadEvents(openTest(t, name))
			if err != nil {
				t.Fatal(err)
			}
			if got == nil || len(got) != len(want) {
				t.Fatalf("%d events, want %d", len(got), len(want))
			}
			for i, w := range want {
				we := data.Event{Onset: w.Onset, Duration: w.Duration, Type: w.Type, Extra: nilIfEmpty(w.Extra)}
				if !reflect.DeepEqual(got[i], we) {
					t.Errorf("event %d = %+v, want %+v", i, got[i], we)
				}
			}
		})
	}
}

func TestReadChannels(t *testing.T) {
	_, chRef := loadRef(t)
	for name, want := range chRef {
		t.Run(name, func(t *testing.T) {
			got, err := ReadChannels(openTest(t, name))
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != len(want) {
				t.Fatalf("%d channels, want %d", len(got), len(want))
			}
			var bad []string
			for i, w := range want {
				wc := ChannelInfo{Name: w.Name, Type: w.Type, Units: w.Units, Status: w.Status,
					StatusDescription: w.StatusDescription, Extra: nilIfEmpty(w.Extra)}
				if !reflect.DeepEqual(got[i], wc) {
					t.Errorf("channel %d = %+v, want %+v", i, got[i], wc)
				}
				if w.Status == "bad" {
					bad = append(bad, w.Name)
				}
			}
			if b := Bad(got); !reflect.DeepEqual(b, bad) {
				t.Errorf("Bad = %q, want %q", b, bad)
			}
		})
	}
}

// TestInvalid lists every testdata/bids/invalid-* file with the exact error
// expected (the golden check of the messages).
func TestInvalid(t *testing.T) {
	cases := []struct {
		file, want string
	}{
		{"invalid-events-empty.tsv", "bids: invalid-events-empty.tsv: file is empty"},
		{"invalid-events-no-onset.tsv", "bids: invalid-events-no-onset.tsv:1: events file has no onset column; columns are: time, duration, trial_type"},
		{"invalid-events-commas.tsv", "bids: invalid-events-commas.tsv:1: events file has no onset column; columns are: onset,duration,trial_type (the file must be tab-separated)"},
		{"invalid-events-onset.tsv", `bids: invalid-events-onset.tsv:3:1: onset "soon" is not a number of seconds`},
		{"invalid-events-onset-na.tsv", `bids: invalid-events-onset-na.tsv:2:1: onset "n/a" is not a number of seconds`},
		{"invalid-events-duration.tsv", `bids: invalid-events-duration.tsv:2:2: duration "long" is not a number of seconds`},
		{"invalid-events-negative.tsv", `bids: invalid-events-negative.tsv:2:2: duration "-0.5" is negative`},
		{"invalid-events-ragged.tsv", "bids: invalid-events-ragged.tsv:3:2: row has 2 fields; the header has 3"},
		{"invalid-events-dup-column.tsv", `bids: invalid-events-dup-column.tsv:1:3: duplicate column "Onset" (also column 1)`},
		{"invalid-channels-no-units.tsv", "bids: invalid-channels-no-units.tsv:1: channels file has no units column; columns are: name, type"},
		{"invalid-channels-status.tsv", `bids: invalid-channels-status.tsv:2:4: status "ok" is not good, bad or n/a`},
		{"invalid-channels-dup.tsv", `bids: invalid-channels-dup.tsv:4:1: channel "Fz" is listed again (first at line 2)`},
		{"invalid-channels-ragged.tsv", "bids: invalid-channels-ragged.tsv:2:4: row has 4 fields; the header has 3"},
		{"invalid-channels-name.tsv", "bids: invalid-channels-name.tsv:2:1: channel name is missing"},
		{"invalid-electrodes-nan.tsv", `bids: invalid-electrodes-nan.tsv:2:4: z of electrode "Fz" is "NaN", not a finite number`},
		{"invalid-electrodes-one-point.tsv", "bids: invalid-electrodes-one-point.tsv:2: every electrode (lines 2–4) is at the same point (1, 2, 3), so their positions cannot be used"},
		{"invalid-electrodes-partial-na.tsv", `bids: invalid-electrodes-partial-na.tsv:2: electrode "Fz" has only some of x, y, z as n/a`},
		{"invalid-electrodes-no-z.tsv", "bids: invalid-electrodes-no-z.tsv:1: electrodes file has no z column; columns are: name, x, y"},
		{"invalid-electrodes-dup.tsv", `bids: invalid-electrodes-dup.tsv:3:1: electrode "fz" is listed again (first at line 2)`},
		{"invalid-electrodes-text.tsv", `bids: invalid-electrodes-text.tsv:2:3: y of electrode "Fz" is "abc", not a finite number`},
		{"invalid-coordsystem-units.json", `bids: invalid-coordsystem-units.json (EEGCoordinateUnits): "inch" is not m, cm or mm`},
		{"invalid-coordsystem-syntax.json", "bids: invalid-coordsystem-syntax.json: offset 23: not valid JSON: unexpected end of JSON input"},
		{"invalid-participants-first.tsv", `bids: invalid-participants-first.tsv:1:1: the first column must be participant_id, found "age"`},
		{"invalid-participants-dup.tsv", `bids: invalid-participants-dup.tsv:3:1: participant "sub-01" is listed twice (first on line 2)`},
		{"invalid-participants-id.tsv", `bids: invalid-participants-id.tsv:2:1: participant_id "01" is not sub-<label> with an alphanumeric label`},
		{"invalid-participants-label.tsv", `bids: invalid-participants-label.tsv:2:1: participant_id "sub-01_a" is not sub-<label> with an alphanumeric label`},
		{"invalid-participants-ragged.tsv", "bids: invalid-participants-ragged.tsv:2:3: row has 3 fields; the header has 2"},
	}
	listed := map[string]bool{}
	for _, tc := range cases {
		listed[tc.file] = true
		t.Run(tc.file, func(t *testing.T) {
			var err error
			var got any
			switch {
			case strings.HasPrefix(tc.file, "invalid-participants"):
				var p *Participants
				p, err = ReadParticipants(openTest(t, tc.file))
				if p != nil {
					got = p
				}
			case strings.HasPrefix(tc.file, "invalid-electrodes"):
				var es []Electrode
				es, err = ReadElectrodes(openTest(t, tc.file))
				if es != nil {
					got = es
				}
			case strings.HasPrefix(tc.file, "invalid-coordsystem"):
				var cs CoordSystem
				cs, err = ReadCoordSystem(openTest(t, tc.file))
				if cs != (CoordSystem{}) {
					got = cs
				}
			case strings.HasPrefix(tc.file, "invalid-events"):
				var evs []data.Event
				evs, err = ReadEvents(openTest(t, tc.file))
				if evs != nil {
					got = evs
				}
			default:
				var chs []ChannelInfo
				chs, err = ReadChannels(openTest(t, tc.file))
				if chs != nil {
					got = chs
				}
			}
			if err == nil || err.Error() != tc.want {
				t.Fatalf("error\n got %v\nwant %s", err, tc.want)
			}
			if got != nil {
				t.Errorf("got %v with the error", got)
			}
			var fe *format.Error
			if !errors.As(err, &fe) || fe.Format != "bids" || fe.File != tc.file {
				t.Errorf("error %#v is not a *format.Error for bids %s", err, tc.file)
			}
		})
	}
	all, _ := filepath.Glob(filepath.Join(dir, "invalid-*"))
	for _, p := range all {
		if !listed[filepath.Base(p)] {
			t.Errorf("%s has no expected error", filepath.Base(p))
		}
	}
}

// TestReadEventsEpoch checks that events read here drive data.Epoch.
func TestReadEventsEpoch(t *testing.T) {
	evs, err := ReadEvents(openTest(t, "events.tsv"))
	if err != nil {
		t.Fatal(err)
	}
	r := &data.Recording{Name: "r", Rate: 10, Channels: []data.Channel{{Name: "a"}}, Samples: [][]float32{make([]float32, 150)}}
	for i := range r.Samples[0] {
		r.Samples[0][i] = float32(i)
	}
	e, err := data.Epoch(r, evs, "stop", 0, 0.2)
	if err != nil {
		t.Fatal(err)
	}
	// stop events at 5.6 s and 12.0 s → samples 56 and 120 at 10 Hz.
	if e.NTrials != 2 || e.Trial(0, 0)[0] != 56 || e.Trial(1, 0)[2] != 122 {
		t.Errorf("epochs %d trials, first samples %v %v", e.NTrials, e.Trial(0, 0), e.Trial(1, 0))
	}
	if e.TrialInfo[1].Extra["response_time"] != "0.512" {
		t.Errorf("trial info %+v", e.TrialInfo[1])
	}
}

// The events and channels tables guard formula-like cells as results.csv
// does (a leading apostrophe, common practice: OWASP "CSV injection") and
// read them back unchanged.
func TestWriteGuardsFormulas(t *testing.T) {
	evs := []data.Event{{Onset: 1, Duration: 0, Type: "=cmd()", Extra: map[string]string{"+note": "@x"}}}
	var b bytes.Buffer
	if err := WriteEvents(&b, evs); err != nil {
		t.Fatal(err)
	}
	if want := "onset\tduration\ttrial_type\t'+note\n1\t0\t'=cmd()\t'@x\n"; b.String() != want {
		t.Errorf("events.tsv\n%q, want\n%q", b.String(), want)
	}
	back, err := ReadEvents(format.Bytes("e_events.tsv", b.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	if back[0].Type != "=cmd()" || back[0].Extra["+note"] != "@x" {
		t.Errorf("read back %+v", back[0])
	}
	b.Reset()
	if err := WriteChannels(&b, []data.Channel{{Name: "-Fz", Type: "EEG", Unit: "µV"}}, nil); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "'-Fz\tEEG\tµV\tgood") {
		t.Errorf("channels.tsv %q", b.String())
	}
	infos, err := ReadChannels(format.Bytes("c_channels.tsv", b.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	if infos[0].Name != "-Fz" {
		t.Errorf("channel reads back as %q", infos[0].Name)
	}
}
