// Package f32 reads and writes epochs stored as raw little-endian float32
// with a JSON sidecar.
//
// NAME.f32 holds trials·channels·samples IEEE-754 float32 values, little
// endian, in [trial][channel][sample] order, and nothing else. Beside it,
// NAME.json describes the layout:
//
//	{"sampleRate": 500, "channels": ["Fz", "Cz"], "trials": 180,
//	 "samples": 1250, "start": -1.0, "units": "uV",
//	 "trialTypes": ["tone", "noise", ...]}
//
// sampleRate is in Hz, start is the time of sample 0 relative to the event in
// seconds. sampleRate, channels, trials, samples and start are required;
// units (one physical unit for every channel) and trialTypes (one string per
// trial, carried into data.Epochs.TrialInfo[i].Type) are optional. Any other
// key is an error, so a typo is never ignored.
//
// The binary must hold exactly trials·channels·samples·4 bytes; this is
// checked before anything is allocated, and the binary is then read in
// chunks through its io.ReaderAt. NaN and infinite values are errors naming
// the byte offset (from 0) and the trial, channel and sample (from 1).
// Sidecar errors give the line and column of the offending value and its key.
//
// Importing the package registers format "f32": a dropped NAME.f32 opens
// NAME.json through format.Siblings, and a dropped NAME.json sidecar opens
// NAME.f32. The sibling is asked for by its base name, without directory.
package f32
