// Package bids reads the tab-separated sidecar tables of the Brain Imaging
// Data Structure (Gorgolewski et al. 2016, Sci Data 3:160044; for EEG,
// Pernet et al. 2019, Sci Data 6:103): events.tsv, channels.tsv and the
// dataset's participants.tsv.
//
// Both are tab-separated with a header line; "n/a" marks a missing value.
// Every error is a *format.Error with Format "bids", the file, the line and
// the column (1-based field number).
package bids
