package study

import (
	"errors"
	"fmt"
	"reflect"
	"sort"
	"strings"
	"testing"

	"amplink/core/dataset"
	"amplink/core/format"
	_ "amplink/core/format/all"
	"amplink/core/format/bids"
	"amplink/core/recipe"
)

// memFS is a dataset held in memory: path → contents.
type memFS map[string]string

func (m memFS) Open(p string) (format.File, error) {
	s, ok := m[p]
	if !ok {
		return format.File{}, fmt.Errorf("%s: %w", p, format.ErrNoSibling)
	}
	return format.Bytes(p, []byte(s)), nil
}

func (m memFS) paths() []string {
	var ps []string
	for p := range m {
		ps = append(ps, p)
	}
	sort.Strings(ps)
	return ps
}

func find(t *testing.T, m memFS, f Filter) *Study {
	t.Helper()
	s, err := Find(m.paths(), m, f)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func recordingPaths(s *Study) []string {
	var ps []string
	for _, r := range s.Recordings {
		ps = append(ps, r.Path)
	}
	return ps
}

func skippedReason(s *Study, p string) string {
	for _, k := range s.Skipped {
		if k.Path == p {
			return k.Reason
		}
	}
	return ""
}

const (
	desc   = `{"Name": "test", "BIDSVersion": "1.9.0"}`
	events = "onset\tduration\ttrial_type\n1\t0\ttone\n2\t0\ttone\n"
)

// The BIDS specification, "Common principles", "Filenames" and the
// "Entity table" appendix: entities are key-value pairs joined by "_",
// in a fixed order (sub, ses, task, acq, run for EEG), then the suffix and
// the extension.
func TestParseNameEntityOrder(t *testing.T) {
	cases := []struct {
		name string
		want Name
		err  string
	}{
		// The specification's EEG example name (from memory).
		{"sub-control01_task-rest_eeg.edf", Name{Entities: []Entity{{"sub", "control01"}, {"task", "rest"}}, Suffix: "eeg", Ext: ".edf"}, ""},
		{"sub-01_ses-1_task-tones_acq-hi_run-02_eeg.bdf", Name{Entities: []Entity{{"sub", "01"}, {"ses", "1"}, {"task", "tones"}, {"acq", "hi"}, {"run", "02"}}, Suffix: "eeg", Ext: ".bdf"}, ""},
		{"task-tones_events.tsv", Name{Entities: []Entity{{"task", "tones"}}, Suffix: "events", Ext: ".tsv"}, ""},
		{"sub-01_task-x_meg.ds.tar.gz", Name{Entities: []Entity{{"sub", "01"}, {"task", "x"}}, Suffix: "meg", Ext: ".ds.tar.gz"}, ""},
		{"sub-01_run-1_task-tones_eeg.edf", Name{}, "entity task comes after run; the specification's order is sub, task, run"},
		{"sub-01_acq-hi_task-tones_eeg.edf", Name{}, "entity task comes after acq"},
		{"ses-1_sub-01_eeg.edf", Name{}, "entity sub comes after ses"},
		{"sub-01_sub-02_eeg.edf", Name{}, "entity sub appears twice"},
		{"sub-01_colour-red_eeg.edf", Name{}, `unknown entity "colour"`},
		{"sub-01_task-go_nogo_eeg.edf", Name{}, `"nogo" is not an entity key-value pair`},
		{"sub-01_run-a_eeg.edf", Name{}, `entity run has value "a", not a non-negative integer`},
		{"sub-0_1_eeg.edf", Name{}, `"1" is not an entity key-value pair`},
		{"sub-01_task-tones_e-eg.edf", Name{}, `suffix "e-eg" is not alphanumeric`},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ParseName(tc.name)
			if tc.err != "" {
				if err == nil || !strings.Contains(err.Error(), tc.err) {
					t.Fatalf("error %v, want %q", err, tc.err)
				}
				return
			}
			if err != nil || !reflect.DeepEqual(got, tc.want) {
				t.Fatalf("got %+v, %v; want %+v", got, err, tc.want)
			}
		})
	}
}

// A file out of the specification's entity order is skipped, with the
// reason, and the others are found ("Filenames", "Entity table").
func TestFindEntityOrder(t *testing.T) {
	m := memFS{
		"dataset_description.json":                    desc,
		"sub-01/eeg/sub-01_task-tones_acq-hi_eeg.edf": "x",
		"sub-01/eeg/sub-01_acq-lo_task-tones_eeg.edf": "x",
	}
	s := find(t, m, Filter{})
	if got := recordingPaths(s); !reflect.DeepEqual(got, []string{"sub-01/eeg/sub-01_task-tones_acq-hi_eeg.edf"}) {
		t.Errorf("recordings %q", got)
	}
	if r := skippedReason(s, "sub-01/eeg/sub-01_acq-lo_task-tones_eeg.edf"); !strings.Contains(r, "entity task comes after acq") {
		t.Errorf("reason %q", r)
	}
	r := s.Recordings[0]
	if r.Sub != "01" || r.Task != "tones" || r.Acq != "hi" || r.Ses != "" || r.Run != "" || r.Datatype != "eeg" {
		t.Errorf("entities %+v", r)
	}
}

// The BIDS specification, "Common principles", "The Inheritance
// Principle": a companion applies when it lies in the recording's folder
// or above, has the same suffix and a subset of the recording's entities;
// the closest applicable file wins (tables are not merged), and two at one
// level are ambiguous.
func TestFindInheritance(t *testing.T) {
	m := memFS{
		"dataset_description.json": desc,
		// Dataset level: every tones recording, and none of the rest ones.
		"task-tones_events.tsv":   events,
		"task-rest_events.tsv":    events,
		"task-tones_channels.tsv": "name\ttype\tunits\nFz\tEEG\tuV\n",
		// sub-01 inherits everything; sub-02 overrides events at its own level.
		"sub-01/eeg/sub-01_task-tones_eeg.edf":    "x",
		"sub-02/eeg/sub-02_task-tones_eeg.edf":    "x",
		"sub-02/eeg/sub-02_task-tones_events.tsv": events,
		// sub-03: a subject-level table, and one with an entity the recording lacks.
		"sub-03/eeg/sub-03_task-tones_run-1_eeg.edf":        "x",
		"sub-03/sub-03_task-tones_events.tsv":               events,
		"sub-03/eeg/sub-03_task-tones_acq-hi_events.tsv":    events,
		"sub-03/eeg/sub-03_task-tones_run-1_electrodes.tsv": "name\tx\ty\tz\n",
		"sub-03/eeg/sub-03_task-tones_run-1_trials.tsv":     "trial\trt\n1\t0.3\n",
		"sub-04/eeg/sub-04_task-tones_run-1_eeg.edf":        "x",
		"sub-04/eeg/sub-04_task-tones_events.tsv":           events,
		"sub-04/eeg/sub-04_run-1_events.tsv":                events,
		"sub-05/eeg/sub-05_task-tones_run-1_eeg.edf":        "x",
		"sub-05/eeg/sub-05_task-tones_events.tsv":           events,
		"sub-05/eeg/sub-05_run-1_events.tsv":                events,
		"sub-05/eeg/sub-05_task-tones_run-1_events.tsv":     events,
		"sub-06/eeg/sub-06_task-rest_eeg.edf":               "x",
		"sub-06/eeg/sub-06_task-rest_acq-hi_channels.tsv":   "name\ttype\tunits\n",
		"sub-07/eeg/sub-07_task-tones_eeg.edf":              "x",
		"sub-01/eeg/sub-07_task-tones_events.tsv":           events, // in another subject's folder: applies to nobody
		"sub-07/ses-1/eeg/sub-07_ses-1_task-tones_eeg.edf":  "x",
		"sub-07/ses-1/sub-07_ses-1_task-tones_channels.tsv": "name\ttype\tunits\n",
	}
	s := find(t, m, Filter{})
	comp := map[string]map[string]string{}
	for _, r := range s.Recordings {
		comp[r.Path] = r.Companions
	}
	want := map[string]map[string]string{
		"sub-01/eeg/sub-01_task-tones_eeg.edf": {"events": "task-tones_events.tsv", "channels": "task-tones_channels.tsv"},
		"sub-02/eeg/sub-02_task-tones_eeg.edf": {"events": "sub-02/eeg/sub-02_task-tones_events.tsv", "channels": "task-tones_channels.tsv"},
		"sub-03/eeg/sub-03_task-tones_run-1_eeg.edf": {"events": "sub-03/sub-03_task-tones_events.tsv", "channels": "task-tones_channels.tsv",
			"electrodes": "sub-03/eeg/sub-03_task-tones_run-1_electrodes.tsv", "trials": "sub-03/eeg/sub-03_task-tones_run-1_trials.tsv"},
		// Of two applicable files at one level, the one with more entities wins.
		"sub-05/eeg/sub-05_task-tones_run-1_eeg.edf": {"events": "sub-05/eeg/sub-05_task-tones_run-1_events.tsv", "channels": "task-tones_channels.tsv"},
		"sub-06/eeg/sub-06_task-rest_eeg.edf":        {"events": "task-rest_events.tsv"},
		"sub-07/eeg/sub-07_task-tones_eeg.edf":       {"events": "task-tones_events.tsv", "channels": "task-tones_channels.tsv"},
		// The session-level table applies below its session only.
		"sub-07/ses-1/eeg/sub-07_ses-1_task-tones_eeg.edf": {"events": "task-tones_events.tsv", "channels": "sub-07/ses-1/sub-07_ses-1_task-tones_channels.tsv"},
	}
	if !reflect.DeepEqual(comp, want) {
		for p := range want {
			if !reflect.DeepEqual(comp[p], want[p]) {
				t.Errorf("%s: companions %v, want %v", p, comp[p], want[p])
			}
		}
		for p := range comp {
			if _, ok := want[p]; !ok {
				t.Errorf("unexpected recording %s", p)
			}
		}
	}
	if r := skippedReason(s, "sub-04/eeg/sub-04_task-tones_run-1_eeg.edf"); !strings.Contains(r, "no single events table") {
		t.Errorf("two applicable events tables at one level: reason %q", r)
	}
	for _, p := range []string{"sub-03/eeg/sub-03_task-tones_acq-hi_events.tsv", "sub-06/eeg/sub-06_task-rest_acq-hi_channels.tsv", "sub-01/eeg/sub-07_task-tones_events.tsv"} {
		if r := skippedReason(s, p); !strings.Contains(r, "applies to no recording") {
			t.Errorf("%s: reason %q", p, r)
		}
	}
}

// Siblings gives dataset.Open the inherited companions: a continuous CSV
// recording epoched by the events of a dataset-level events.tsv, with a bad
// channel from a subject-level channels.tsv.
func TestSiblingsInherited(t *testing.T) {
	var b strings.Builder
	b.WriteString("time,Fz,Cz\n")
	for i := range 400 {
		fmt.Fprintf(&b, "%g,%d,%d\n", float64(i)/100, i%7, i%5)
	}
	m := memFS{
		"task-tones_events.tsv":                   "onset\tduration\ttrial_type\n1\t0\ttone\n2\t0\ttone\n3\t0\ttone\n",
		"sub-01/sub-01_task-tones_channels.tsv":   "name\ttype\tunits\tstatus\nFz\tEEG\tuV\tgood\nCz\tEEG\tuV\tbad\n",
		"sub-01/eeg/sub-01_task-tones_eeg.csv":    b.String(),
		"sub-01/eeg/sub-01_task-tones_trials.csv": "trial,rt\n1,0.3\n2,0.4\n3,n/a\n",
	}
	s := find(t, m, Filter{})
	if len(s.Recordings) != 1 {
		t.Fatalf("recordings %v, skipped %v", recordingPaths(s), s.Skipped)
	}
	r := &s.Recordings[0]
	rcp, err := recipe.Parse([]byte(`{"epochs": {"event": "tone", "start": -0.5, "end": 0.5}, "analyses": [{"id": "e", "type": "envelope", "channels": "*", "freq": [8, 12]}]}`))
	if err != nil {
		t.Fatal(err)
	}
	f, _ := m.Open(r.Path)
	ds, err := dataset.Open(rcp, f, nil, r.Siblings(m))
	if err != nil {
		t.Fatal(err)
	}
	if ds.Epochs == nil || ds.Epochs.NTrials != 3 || len(ds.Epochs.Channels) != 1 || ds.Epochs.Channels[0].Name != "Fz" {
		t.Fatalf("dataset %+v", dataset.Describe(ds))
	}
	if v := ds.Epochs.TrialInfo[1].Extra["rt"]; v != "0.4" {
		t.Errorf("trial 2 rt = %q, want 0.4 from the trials table", v)
	}
	// A companion kind that applies to nothing is absent, not looked for beside the file.
	if _, err := r.Siblings(m).Open("sub-01_task-tones_electrodes.tsv"); !errors.Is(err, format.ErrNoSibling) {
		t.Errorf("electrodes: %v, want ErrNoSibling", err)
	}
}

// The BIDS specification, "Folder structure": an optional session level
// between subject and datatype; the file's ses entity must match its
// folder, and the session filter picks one session.
func TestFindSessions(t *testing.T) {
	m := memFS{
		"dataset_description.json":                               desc,
		"participants.tsv":                                       "participant_id\tgroup\nsub-01\tA\nsub-02\tB\n",
		"sub-01/ses-pre/eeg/sub-01_ses-pre_task-tones_eeg.bdf":   "x",
		"sub-01/ses-post/eeg/sub-01_ses-post_task-tones_eeg.bdf": "x",
		"sub-02/ses-pre/eeg/sub-02_ses-pre_task-tones_eeg.bdf":   "x",
		"sub-02/ses-pre/eeg/sub-02_ses-post_task-tones_eeg.bdf":  "x",
		"sub-02/eeg/sub-02_ses-pre_task-tones_eeg.bdf":           "x",
	}
	s := find(t, m, Filter{})
	if got := recordingPaths(s); len(got) != 3 {
		t.Errorf("recordings %q, want 3", got)
	}
	if got := s.Sessions(); !reflect.DeepEqual(got, []string{"post", "pre"}) {
		t.Errorf("sessions %q", got)
	}
	if r := skippedReason(s, "sub-02/ses-pre/eeg/sub-02_ses-post_task-tones_eeg.bdf"); !strings.Contains(r, `ses entity "post" does not match its folder ses-pre`) {
		t.Errorf("reason %q", r)
	}
	if r := skippedReason(s, "sub-02/eeg/sub-02_ses-pre_task-tones_eeg.bdf"); !strings.Contains(r, "has no ses-pre folder") {
		t.Errorf("reason %q", r)
	}
	s = find(t, m, Filter{Session: "pre", GroupColumn: "group"})
	if got := recordingPaths(s); !reflect.DeepEqual(got, []string{"sub-01/ses-pre/eeg/sub-01_ses-pre_task-tones_eeg.bdf", "sub-02/ses-pre/eeg/sub-02_ses-pre_task-tones_eeg.bdf"}) {
		t.Errorf("session pre: %q", got)
	}
	if r := skippedReason(s, "sub-01/ses-post/eeg/sub-01_ses-post_task-tones_eeg.bdf"); !strings.Contains(r, "left out by the filter") {
		t.Errorf("reason %q", r)
	}
	if g := s.GroupOf(); !reflect.DeepEqual(g, map[string]string{"sub-01_ses-pre_task-tones_eeg.bdf": "A", "sub-02_ses-pre_task-tones_eeg.bdf": "B"}) {
		t.Errorf("groups %v", g)
	}
}

// The BIDS specification, "Modality agnostic files", "Participants file":
// participants.tsv is recommended, not required. Without it the recordings
// are still found and a note says so; a group column cannot be chosen.
func TestFindNoParticipants(t *testing.T) {
	m := memFS{
		"sub-01/eeg/sub-01_task-tones_eeg.edf": "x",
		"sub-02/eeg/sub-02_task-tones_eeg.edf": "x",
	}
	s := find(t, m, Filter{})
	if len(s.Recordings) != 2 || s.Columns != nil || s.Recordings[0].Participant != nil {
		t.Errorf("study %+v", s)
	}
	notes := strings.Join(s.Notes, "\n")
	for _, want := range []string{"no participants.tsv", "no dataset_description.json"} {
		if !strings.Contains(notes, want) {
			t.Errorf("notes %q lack %q", notes, want)
		}
	}
	if _, err := Find(m.paths(), m, Filter{GroupColumn: "group"}); err == nil || !strings.Contains(err.Error(), "no participants.tsv") {
		t.Errorf("group column without participants.tsv: %v", err)
	}
}

// participants.tsv columns reach the recordings; the group column assigns
// groups, a recording without a value is skipped with the reason, and a
// column that does not give two groups is refused.
func TestFindParticipants(t *testing.T) {
	m := memFS{
		"dataset_description.json":                    desc,
		"participants.tsv":                            "participant_id\tage\tGroup\tsite\nsub-01\t30\tA\tx\nsub-02\t31\tB\ty\nsub-03\t32\tn/a\tz\nsub-05\t40\tB\tx\n",
		"sub-01/eeg/sub-01_task-tones_run-01_eeg.edf": "x",
		"sub-01/eeg/sub-01_task-tones_run-02_eeg.edf": "x",
		"sub-01/eeg/sub-01_task-rest_eeg.edf":         "x",
		"sub-02/eeg/sub-02_task-tones_run-01_eeg.edf": "x",
		"sub-03/eeg/sub-03_task-tones_run-01_eeg.edf": "x",
		"sub-04/eeg/sub-04_task-tones_run-01_eeg.edf": "x",
	}
	s := find(t, m, Filter{Task: "tones", Run: "1", GroupColumn: "group"})
	if got := recordingPaths(s); !reflect.DeepEqual(got, []string{"sub-01/eeg/sub-01_task-tones_run-01_eeg.edf", "sub-02/eeg/sub-02_task-tones_run-01_eeg.edf"}) {
		t.Fatalf("recordings %q", got)
	}
	if s.GroupColumn != "Group" || !reflect.DeepEqual(s.Groups, []string{"A", "B"}) {
		t.Errorf("group column %q, groups %q", s.GroupColumn, s.Groups)
	}
	if r := s.Recordings[1]; r.Group != "B" || r.Participant["age"] != "31" || r.Participant["site"] != "y" {
		t.Errorf("recording %+v", r)
	}
	for p, want := range map[string]string{
		"sub-01/eeg/sub-01_task-tones_run-02_eeg.edf": `run "02", not "1"`,
		"sub-01/eeg/sub-01_task-rest_eeg.edf":         `task "rest", not "tones"`,
		"sub-03/eeg/sub-03_task-tones_run-01_eeg.edf": "sub-03 has no value (n/a) in participants.tsv column Group",
		"sub-04/eeg/sub-04_task-tones_run-01_eeg.edf": "sub-04 is not in participants.tsv",
	} {
		if r := skippedReason(s, p); !strings.Contains(r, want) {
			t.Errorf("%s: reason %q, want %q", p, r, want)
		}
	}
	if notes := strings.Join(s.Notes, "\n"); !strings.Contains(notes, "without a recording found: sub-05") {
		t.Errorf("notes %q", notes)
	}
	s = find(t, m, Filter{Participants: []string{"sub-02", "03"}})
	if got := s.Participants(); !reflect.DeepEqual(got, []string{"02", "03"}) {
		t.Errorf("participants filter: %q", got)
	}
	if _, err := Find(m.paths(), m, Filter{GroupColumn: "site"}); err == nil || !strings.Contains(err.Error(), "gives 3 groups") {
		t.Errorf("three groups: %v", err)
	}
	if _, err := Find(m.paths(), m, Filter{GroupColumn: "handedness"}); err == nil || !strings.Contains(err.Error(), "no column \"handedness\"; its columns are: age, Group, site") {
		t.Errorf("absent column: %v", err)
	}
	m["participants.tsv"] = "participant_id\tgroup\nsub-01\tA\nsub-01\tB\n"
	if _, err := Find(m.paths(), m, Filter{}); err == nil || !strings.Contains(err.Error(), "participants.tsv:3:1") {
		t.Errorf("bad participants.tsv: %v", err)
	}
}

// Files that are not part of the BIDS layout, or not recordings amplink
// reads, are skipped with the reason and do not stop the others
// ("Folder structure"; "Modality specific files" for the data formats).
func TestFindUnrelatedFiles(t *testing.T) {
	m := memFS{
		"dataset_description.json":                      desc,
		"README":                                        "about",
		"notes.txt":                                     "an extra unrelated file",
		".git/config":                                   "x",
		"code/recipe.json":                              "{}",
		"derivatives/amplink/results.csv":               "x",
		"sub-01/anat/sub-01_T1w.nii.gz":                 "x",
		"sub-01/eeg/sub-01_task-tones_eeg.edf":          "x",
		"sub-01/eeg/sub-01_task-tones_eeg.json":         "{}",
		"sub-01/eeg/sub-01_task-tones_eeg.edf.bak":      "x",
		"sub-01/eeg/sub-01_task-tones_coordsystem.json": "{}",
		"sub-02/eeg/sub-02_task-tones_eeg.vhdr":         "x",
		"sub-02/eeg/sub-02_task-tones_eeg.vmrk":         "x",
		"sub-02/eeg/sub-02_task-tones_eeg.eeg":          "x",
		"sub-03/meg/sub-03_task-tones_meg.ds/a.meg4":    "x",
		"sub-04/eeg/sub-04_task-tones_ieeg.edf":         "x",
		"sub-05/eeg/sub-01_task-tones_eeg.edf":          "x",
		"pilot/eeg/p1_eeg.edf":                          "x",
		"sub-06/sub-06_task-tones_eeg.edf":              "x",
	}
	s := find(t, m, Filter{})
	if got := recordingPaths(s); !reflect.DeepEqual(got, []string{"sub-01/eeg/sub-01_task-tones_eeg.edf"}) {
		t.Errorf("recordings %q", got)
	}
	want := map[string]string{
		"notes.txt":    "not part of a BIDS dataset's layout",
		"code/":        "holds no raw recordings",
		"derivatives/": "holds no raw recordings",
		"sub-01/anat/": "datatype anat",
		"sub-01/eeg/sub-01_task-tones_eeg.edf.bak": "extension .edf.bak is not a recording format amplink reads",
		"sub-02/eeg/sub-02_task-tones_eeg.vhdr":    "BrainVision is a format amplink does not read",
		"sub-03/meg/sub-03_task-tones_meg.ds/":     "CTF is a format amplink does not read",
		"sub-04/eeg/sub-04_task-tones_ieeg.edf":    "suffix ieeg is not the recording suffix eeg",
		"sub-05/eeg/sub-01_task-tones_eeg.edf":     `its sub entity "01" does not match its folder sub-05`,
		"pilot/":                                   "not a subject folder",
		"sub-06/sub-06_task-tones_eeg.edf":         "a recording must lie in a datatype folder (eeg/)",
	}
	for p, w := range want {
		if r := skippedReason(s, p); !strings.Contains(r, w) {
			t.Errorf("%s: reason %q, want %q", p, r, w)
		}
	}
	if len(s.Skipped) != len(want) {
		t.Errorf("%d skipped, want %d: %v", len(s.Skipped), len(want), s.Skipped)
	}
	if s.Name != "test" || s.BIDSVersion != "1.9.0" {
		t.Errorf("description %q %q", s.Name, s.BIDSVersion)
	}
}

func TestTrimRoot(t *testing.T) {
	cases := []struct {
		in   []string
		root string
		out  []string
	}{
		{[]string{"study/participants.tsv", "study/sub-01/eeg/a_eeg.edf"}, "study", []string{"participants.tsv", "sub-01/eeg/a_eeg.edf"}},
		{[]string{"participants.tsv", "sub-01/eeg/a_eeg.edf"}, "", []string{"participants.tsv", "sub-01/eeg/a_eeg.edf"}},
		{[]string{"sub-01/eeg/a_eeg.edf", "sub-01/eeg/b_eeg.edf"}, "", []string{"sub-01/eeg/a_eeg.edf", "sub-01/eeg/b_eeg.edf"}},
		{[]string{"a/x", "b/y"}, "", []string{"a/x", "b/y"}},
		{[]string{`ds\sub-01\eeg\a_eeg.edf`}, "ds", []string{"sub-01/eeg/a_eeg.edf"}},
	}
	for _, tc := range cases {
		root, out := TrimRoot(tc.in)
		if root != tc.root || !reflect.DeepEqual(out, tc.out) {
			t.Errorf("TrimRoot(%q) = %q, %q; want %q, %q", tc.in, root, out, tc.root, tc.out)
		}
	}
}

// FuzzParseName: any name either parses into entities in the
// specification's order with alphanumeric values, or is refused; nothing
// panics. Seeded from the names of the tests above.
func FuzzParseName(f *testing.F) {
	for _, s := range []string{"sub-control01_task-rest_eeg.edf", "sub-01_ses-1_task-tones_acq-hi_run-02_eeg.bdf", "task-tones_events.tsv",
		"sub-01_run-1_task-tones_eeg.edf", "sub-01_task-go_nogo_eeg.edf", "sub-01_run-a_eeg.edf", "participants.tsv", "", ".", "_", "sub-_eeg"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		n, err := ParseName(s)
		if err != nil {
			return
		}
		if !bidsLabel(n.Suffix) {
			t.Fatalf("%q: suffix %q", s, n.Suffix)
		}
		last := -1
		for _, e := range n.Entities {
			r, ok := entityRank[e.Key]
			if !ok || r <= last || !bidsLabel(e.Value) {
				t.Fatalf("%q: entities %v", s, n.Entities)
			}
			last = r
		}
	})
}

var bidsLabel = bids.IsLabel
