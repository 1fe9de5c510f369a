// Package dataset opens one recording with its companion files and makes it
// ready for analysis: a Dataset holds the continuous recording, its epochs
// (cut as the recipe's "epochs" block asks, or as the file came), and notes
// for people.
//
// It is the one place that knows sibling files. Open decodes the recording
// (any registered format, found by its magic bytes), then looks beside it,
// by the recording's stem (Stem), for "<stem>_events.tsv" (BIDS events),
// "<stem>_channels.tsv" (bad channels, and names for unnamed audio
// channels) and "<stem>_trials.csv" or "<stem>_trials.tsv" (per-trial values:
// trial,<name>...).
// TrialID, TrialValue and HasColumn read those per-trial values back, and
// Describe summarises a dataset for the page.
package dataset
