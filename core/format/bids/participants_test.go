package bids

import (
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"testing"

	"amplink/core/format"
)

// TestReadParticipants compares each valid participants fixture with what
// Python's csv module reads from it (testdata/bids/make_ref.py, ref.json):
// participant_id first, labels after "sub-", n/a and empty cells missing.
func TestReadParticipants(t *testing.T) {
	b, err := os.ReadFile(filepath.Join(dir, "ref.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Participants map[string]struct {
			Columns []string                     `json:"columns"`
			Labels  []string                     `json:"labels"`
			Values  map[string]map[string]string `json:"values"`
		} `json:"participants"`
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Participants) < 3 {
		t.Fatalf("ref.json has %d participants fixtures, want 3", len(ref.Participants))
	}
	for name, want := range ref.Participants {
		t.Run(name, func(t *testing.T) {
			got, err := ReadParticipants(openTest(t, name))
			if err != nil {
				t.Fatal(err)
			}
			if len(got.Columns) != len(want.Columns) || (len(want.Columns) > 0 && !reflect.DeepEqual(got.Columns, want.Columns)) {
				t.Errorf("columns %q, want %q", got.Columns, want.Columns)
			}
			if len(got.Labels) != len(want.Labels) || (len(want.Labels) > 0 && !reflect.DeepEqual(got.Labels, want.Labels)) {
				t.Errorf("labels %q, want %q", got.Labels, want.Labels)
			}
			for _, l := range want.Labels {
				if !reflect.DeepEqual(got.Values[l], want.Values[l]) {
					t.Errorf("participant %s: %v, want %v", l, got.Values[l], want.Values[l])
				}
			}
		})
	}
	p, err := ReadParticipants(openTest(t, "participants.tsv"))
	if err != nil {
		t.Fatal(err)
	}
	if v, ok := p.Value("02", "GROUP"); !ok || v != "patient" {
		t.Errorf("Value(02, GROUP) = %q, %v; want patient (columns match case-insensitively)", v, ok)
	}
	if v, ok := p.Value("02", "age"); ok {
		t.Errorf("Value(02, age) = %q, present; n/a is missing", v)
	}
}

// FuzzParticipants feeds arbitrary bytes to ReadParticipants, seeded from
// every file in testdata/bids. Nothing may panic; an error is a
// *format.Error with no table; a table obeys the reader's promises.
func FuzzParticipants(f *testing.F) {
	paths, err := filepath.Glob(filepath.Join(dir, "*"))
	if err != nil || len(paths) == 0 {
		f.Fatalf("no seeds in %s: %v", dir, err)
	}
	for _, p := range paths {
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		p, err := ReadParticipants(format.Bytes("participants.tsv", b))
		if err != nil {
			var fe *format.Error
			if p != nil || !errors.As(err, &fe) {
				t.Fatalf("table %v with error %v (%T)", p, err, err)
			}
			return
		}
		if len(p.Values) != len(p.Labels) {
			t.Fatalf("%d rows for %d labels", len(p.Values), len(p.Labels))
		}
		cols := map[string]bool{}
		for _, c := range p.Columns {
			cols[c] = true
		}
		for _, l := range p.Labels {
			if !IsLabel(l) {
				t.Fatalf("label %q is not alphanumeric", l)
			}
			for c, v := range p.Values[l] {
				if !cols[c] || v == NA || v == "" {
					t.Fatalf("participant %s: column %q value %q", l, c, v)
				}
			}
		}
	})
}
