package demo

import (
	"bytes"
	_ "embed"
	"encoding/json"
	"fmt"
	"io"
	"math/rand/v2"
	"strings"

	"amplink/core/data"
	"amplink/core/format/bids"
	"amplink/core/format/edf"
)

// The simulated study: StudyParticipants sessions of the demo's scenario,
// StudyTones tones each, kept to StudyChannels. Half the participants (group
// StudyGroupCoupled) have the C4 beta → Pz delta coupling at
// StudyCoupling; in the other half (group StudyGroupUncoupled) it is
// absent. Every other planted effect (the posterior alpha envelopes) is
// the same in both groups, so the one planted group difference is in the
// beta-to-delta coupling at Pz.
const (
	StudyParticipants   = 12
	StudyTones          = 60
	StudyCoupling       = 0.7
	StudyGroupCoupled   = "rested"
	StudyGroupUncoupled = "sleepy"
	StudyTask           = "tones"
)

// StudyChannels are the channels each study recording keeps. The
// neighbours that the demo's Pz delta spreads to (P3, P4) are left out, so
// that the planted group difference stays at Pz.
var StudyChannels = []string{"Fz", "C3", "Cz", "C4", "Pz", "O1", "O2"}

//go:embed study_recipe.json
var studyRecipeJSON []byte

// StudyRecipe returns the study's recipe as JSON.
func StudyRecipe() []byte { return append([]byte(nil), studyRecipeJSON...) }

// StudyParticipant is one simulated participant.
type StudyParticipant struct {
	Label string // the BIDS label, "01"…
	Group string
	Age   int
	Seed  uint64
}

// Participants lists the study's participants: odd labels in the coupled
// group, even ones in the uncoupled group, with invented ages.
func Participants() []StudyParticipant {
	rng := rand.New(rand.NewPCG(20261202, StudyParticipants))
	out := make([]StudyParticipant, StudyParticipants)
	for i := range out {
		g := StudyGroupCoupled
		if i%2 == 1 {
			g = StudyGroupUncoupled
		}
		out[i] = StudyParticipant{Label: fmt.Sprintf("%02d", i+1), Group: g, Age: 19 + rng.IntN(27), Seed: 20261300 + uint64(i)}
	}
	return out
}

// StudyRecording simulates p's session, kept to StudyChannels.
func StudyRecording(p StudyParticipant) *data.Recording {
	c := 0.0
	if p.Group == StudyGroupCoupled {
		c = StudyCoupling
	}
	r := Simulate(Options{Seed: p.Seed, Tones: StudyTones, Coupling: c, Channels: StudyChannels})
	r.Name = "sub-" + p.Label
	return r
}

// StudyFile is one file of the study dataset.
type StudyFile struct {
	Path string // slash-separated, relative to the dataset root
	Data []byte
}

// StudyStem is the BIDS name stem of p's recording files.
func StudyStem(p StudyParticipant) string {
	return "sub-" + p.Label + "_task-" + StudyTask
}

// StudyFiles renders the study as a BIDS dataset: dataset_description.json,
// README, participants.tsv and .json, a dataset-level task-tones_eeg.json
// sidecar (inherited by every recording), the recipe as code/recipe.json,
// and per participant sub-<label>/eeg/ the recording as EDF+ (with the tones
// as annotations too) and its events.tsv, channels.tsv and trials.tsv
// (trial, response_time, outcome). emit receives each file as it is made,
// so the recordings need not all be held at once; it may be nil, and then
// StudyFiles returns them all.
func StudyFiles(emit func(StudyFile) error) ([]StudyFile, error) {
	var all []StudyFile
	if emit == nil {
		emit = func(f StudyFile) error { all = append(all, f); return nil }
	}
	put := func(p string, fill func(w io.Writer) error) error {
		var b bytes.Buffer
		if err := fill(&b); err != nil {
			return fmt.Errorf("demo: %s: %w", p, err)
		}
		return emit(StudyFile{p, b.Bytes()})
	}
	text := func(s string) func(io.Writer) error {
		return func(w io.Writer) error { _, err := io.WriteString(w, s); return err }
	}
	js := func(v any) func(io.Writer) error {
		return func(w io.Writer) error {
			b, err := json.MarshalIndent(v, "", "  ")
			if err != nil {
				return err
			}
			_, err = w.Write(append(b, '\n'))
			return err
		}
	}
	ps := Participants()
	var pt strings.Builder
	pt.WriteString("participant_id\tage\tgroup\n")
	for _, p := range ps {
		fmt.Fprintf(&pt, "sub-%s\t%d\t%s\n", p.Label, p.Age, p.Group)
	}
	steps := []struct {
		path string
		fill func(io.Writer) error
	}{
		{"dataset_description.json", js(map[string]any{
			"Name": "amplink simulated study", "BIDSVersion": "1.9.0", "DatasetType": "raw",
			"GeneratedBy": []map[string]string{{"Name": "amplink demo --study", "Description": "simulated data with planted effects; not recordings of anyone"}},
		})},
		{"README", text(StudyReadme)},
		{"participants.tsv", text(pt.String())},
		{"participants.json", js(map[string]any{
			"age":   map[string]string{"Description": "age of the (invented) participant", "Units": "year"},
			"group": map[string]any{"Description": "simulated group", "Levels": map[string]string{StudyGroupCoupled: "C4 beta to Pz delta coupling planted", StudyGroupUncoupled: "that coupling absent"}},
		})},
		{"task-" + StudyTask + "_eeg.json", js(map[string]any{
			"TaskName": StudyTask, "TaskDescription": "tone detection (simulated)", "SamplingFrequency": Rate,
			"PowerLineFrequency": 50, "EEGReference": "simulated", "SoftwareFilters": "n/a", "EEGChannelCount": len(StudyChannels),
		})},
		{"code/recipe.json", func(w io.Writer) error { _, err := w.Write(studyRecipeJSON); return err }},
	}
	for _, s := range steps {
		if err := put(s.path, s.fill); err != nil {
			return nil, err
		}
	}
	for _, p := range ps {
		rec := StudyRecording(p)
		dir := "sub-" + p.Label + "/eeg/" + StudyStem(p)
		err := put(dir+"_eeg.edf", func(w io.Writer) error { return edf.Write(w, rec, edf.WriteOptions{}) })
		if err == nil {
			err = put(dir+"_events.tsv", func(w io.Writer) error { return bids.WriteEvents(w, rec.Events) })
		}
		if err == nil {
			err = put(dir+"_channels.tsv", func(w io.Writer) error { return bids.WriteChannels(w, rec.Channels, nil) })
		}
		if err == nil {
			err = put(dir+"_trials.tsv", func(w io.Writer) error { return writeTrialsTSV(w, rec.Events) })
		}
		if err != nil {
			return nil, err
		}
	}
	return all, nil
}

// writeTrialsTSV writes trial, response_time and outcome per tone; every
// tone's epoch lies inside the recording, so trial k is the k-th tone.
func writeTrialsTSV(w io.Writer, evs []data.Event) error {
	var b strings.Builder
	b.WriteString("trial\tresponse_time\toutcome\n")
	for k, ev := range evs {
		fmt.Fprintf(&b, "%d\t%s\t%s\n", k+1, ev.Extra["response_time"], ev.Extra["outcome"])
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// StudyPlanted says what the study plants and what a correct analysis of
// it with code/recipe.json finds.
const StudyPlanted = `Planted group difference: C4 pre-tone beta (15-25 Hz) predicts Pz
post-tone delta (1.5-3.5 Hz) across trials in the "rested" group (log-amplitude
correlation 0.7) and not at all in the "sleepy" group. A correct analysis finds
the group:rested-sleepy row of beta-to-delta C4->Pz significant (Welch t on
Fisher z) and no other difference row significant after FDR correction (the
q column). The
O1-O2 alpha envelope coupling is planted in both groups alike: its pooled
group row is significant and its difference row is not.`

// StudyReadme is the study dataset's README.
const StudyReadme = `amplink simulated study (BIDS)

Invented data, made by a deterministic simulator (amplink demo --study), for
trying a whole-study analysis. They are not recordings of anyone.

12 participants (sub-01 ... sub-12) in two groups of 6 (participants.tsv,
column group: odd labels "rested", even labels "sleepy"), each with one
session of the demo's tone-detection scenario: 60 tones, 7 EEG channels
(Fz, C3, Cz, C4, Pz, O1, O2) at 500 Hz over 1/f background noise, stored as
EDF+ with its events.tsv, channels.tsv and trials.tsv (trial, response_time,
outcome). task-tones_eeg.json at the top applies to every recording by the
BIDS inheritance principle. code/recipe.json is the study's analysis.

` + StudyPlanted + `

Run it:
  amplink run --recipe code/recipe.json --out results --dataset . --group-column group
`
