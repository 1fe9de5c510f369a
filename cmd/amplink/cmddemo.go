package main

import (
	"bytes"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"amplink/core/data"
	"amplink/core/demo"
	"amplink/core/format/bids"
	"amplink/core/format/csv"
	"amplink/core/format/edf"
	"amplink/core/format/f32"
	"amplink/core/format/wav"
)

func cmdDemo(stdout, stderr io.Writer, args []string) error {
	fs := flag.NewFlagSet("demo", flag.ContinueOnError)
	fs.SetOutput(stderr)
	out := fs.String("out", "amplink-demo", "directory to write the demo files into")
	studyDir := fs.String("study", "", "write the simulated BIDS study (12 participants in two groups) into this directory instead")
	if err := fs.Parse(args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return fmt.Errorf("demo: unexpected argument %q", fs.Arg(0))
	}
	if *studyDir != "" {
		return writeStudy(stdout, *studyDir)
	}
	if err := os.MkdirAll(*out, 0o755); err != nil {
		return err
	}
	files, err := demoFiles()
	if err != nil {
		return err
	}
	for _, f := range files {
		p := filepath.Join(*out, f.name)
		if err := os.WriteFile(p, f.data, 0o644); err != nil {
			return err
		}
		fmt.Fprintf(stdout, "wrote %s (%d bytes)\n", p, len(f.data))
	}
	fmt.Fprintf(stdout, "try: amplink run --recipe %s --out %s %s\n",
		filepath.Join(*out, "recipe.json"), filepath.Join(*out, "results"), filepath.Join(*out, "demo_epochs.csv"))
	return nil
}

// writeStudy writes the simulated BIDS study into dir, one file at a time.
func writeStudy(stdout io.Writer, dir string) error {
	n, size := 0, 0
	_, err := demo.StudyFiles(func(f demo.StudyFile) error {
		p := filepath.Join(dir, filepath.FromSlash(f.Path))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			return err
		}
		n++
		size += len(f.Data)
		return os.WriteFile(p, f.Data, 0o644)
	})
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "wrote the simulated BIDS study to %s: %d participants in groups %s and %s, %d files, %d bytes\n",
		dir, demo.StudyParticipants, demo.StudyGroupCoupled, demo.StudyGroupUncoupled, n, size)
	fmt.Fprintln(stdout, demo.StudyPlanted)
	fmt.Fprintf(stdout, "try: amplink run --recipe %s --out %s --dataset %s --group-column group\n",
		filepath.Join(dir, "code", "recipe.json"), filepath.Join(dir, "..", filepath.Base(dir)+"-results"), dir)
	return nil
}

type namedFile struct {
	name string
	data []byte
}

// demoFiles renders the simulated demo in every input form.
func demoFiles() ([]namedFile, error) {
	var files []namedFile
	add := func(name string, fill func(w io.Writer) error) error {
		var b bytes.Buffer
		if err := fill(&b); err != nil {
			return fmt.Errorf("demo: %s: %w", name, err)
		}
		files = append(files, namedFile{name, b.Bytes()})
		return nil
	}
	if err := add("recipe.json", func(w io.Writer) error { _, err := w.Write(demo.Recipe()); return err }); err != nil {
		return nil, err
	}
	rec, ep := demo.Recording(), demo.Epochs()
	var sidecar bytes.Buffer
	steps := []struct {
		name string
		fill func(w io.Writer) error
	}{
		{"demo_epochs.csv", func(w io.Writer) error { return csv.WriteEpochs(w, ep) }},
		{"demo_epochs.f32", func(w io.Writer) error { return f32.Write(w, &sidecar, ep) }},
		{"demo_epochs.json", func(w io.Writer) error { _, err := w.Write(sidecar.Bytes()); return err }},
		{"demo_epochs_trials.csv", func(w io.Writer) error { return writeTrials(w, ep) }},
		{"demo_continuous.csv", func(w io.Writer) error { return csv.WriteRecording(w, rec) }},
		{"demo_continuous_events.tsv", func(w io.Writer) error { return bids.WriteEvents(w, rec.Events) }},
		{"demo_edf.edf", func(w io.Writer) error { return edf.Write(w, rec, edf.WriteOptions{}) }},
		{"demo_edf_trials.csv", func(w io.Writer) error { return writeTrials(w, ep) }},
		{"demo_wav.wav", func(w io.Writer) error { return wav.Write(w, rec, wav.Options{Encoding: wav.Float32}) }},
		{"demo_wav_channels.tsv", func(w io.Writer) error { return bids.WriteChannels(w, rec.Channels, nil) }},
		{"demo_wav_events.tsv", func(w io.Writer) error { return bids.WriteEvents(w, rec.Events) }},
	}
	for _, s := range steps {
		if err := add(s.name, s.fill); err != nil {
			return nil, err
		}
	}
	if err := add("README.txt", func(w io.Writer) error { _, err := io.WriteString(w, demoReadme); return err }); err != nil {
		return nil, err
	}
	return files, nil
}

const demoReadme = `amplink demo data (simulated)

These files hold invented data, made by a deterministic simulator, for trying
amplink out. They are not recordings of anyone.

Scenario: a tone-detection vigilance session, 19-channel 10-20 EEG at 500 Hz,
180 tones. Planted effects:
  - pre-tone C4 beta power (15-25 Hz, -0.5 to -0.1 s) predicts post-tone Pz
    delta power (1.5-3.5 Hz, 0.3 to 0.8 s) across trials; Fz delta does not
    depend on C4 beta;
  - posterior alpha envelopes co-vary between O1 and O2, and leak at zero lag
    into P3 and P4;
  - the T7 low-beta envelope co-varies with the T8 high-gamma envelope.

Files (the same simulated session in every input form amplink reads):
  recipe.json                  the demo analysis
  demo_epochs.csv              epochs, -1.5 to 2.0 s around each tone (trial,time,<channels>)
  demo_epochs.f32/.json        the same epochs as float32 [trial][channel][sample] + sidecar
  demo_epochs_trials.csv       per-trial response_time and outcome for both epoch files
  demo_continuous.csv          the continuous recording (time,<channels>)
  demo_continuous_events.tsv   its tone events (BIDS events.tsv, with response_time and outcome)
  demo_edf.edf                 the continuous recording as EDF+ with the tones as annotations
  demo_edf_trials.csv          per-trial response_time and outcome for the EDF+ epochs
  demo_wav.wav                 the continuous recording as a 19-channel float32 WAV
  demo_wav_channels.tsv        names for the WAV's channels (BIDS channels.tsv)
  demo_wav_events.tsv          the tone events for the WAV
`

// writeTrials writes the per-trial table (trial,response_time,outcome) that
// goes with the epoch files.
func writeTrials(w io.Writer, e *data.Epochs) error {
	if _, err := io.WriteString(w, "trial,response_time,outcome\n"); err != nil {
		return err
	}
	for t, ev := range e.TrialInfo {
		if _, err := fmt.Fprintf(w, "%d,%s,%s\n", t+1, ev.Extra["response_time"], ev.Extra["outcome"]); err != nil {
			return err
		}
	}
	return nil
}
