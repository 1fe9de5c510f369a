// Package study finds the recordings of a BIDS dataset (the Brain Imaging
// Data Structure: Gorgolewski et al. 2016, Sci Data 3:160044; for EEG,
// Pernet et al. 2019, Sci Data 6:103) from a listing of its files, without
// touching a file system: the caller gives the relative paths and an Opener,
// so that the command line (os) and the page (picked or dropped folders)
// share the same rules.
//
// Find applies these rules of the specification:
//
//   - Layout ("Folder structure"): a recording is
//     sub-<label>/[ses-<label>/]<datatype>/<entities>_<suffix>.<ext>, with
//     datatype eeg, meg or ieeg, the suffix equal to the datatype, and an
//     extension amplink reads (.edf and .bdf, the BIDS formats it reads, and
//     its own .f32, .wav, .mp3 and .csv). The file's sub and ses entities
//     must match its folders.
//   - Entities ("Filenames", "Entity table"): key-value pairs joined by "_",
//     in the specification's order (sub, ses, task, acq, run, … for EEG);
//     labels are alphanumeric and the run index a non-negative integer.
//   - The inheritance principle ("Common principles"): a companion table
//     (events, channels, electrodes, and amplink's own trials) applies to a
//     recording when it lies in the recording's folder or a folder above it
//     (dataset root, subject, session), has the same suffix, and all of its
//     entities appear in the recording's name with the same values. The
//     applicable file closest to the recording wins; tables are not merged.
//     Two applicable files at one level with the same number of entities
//     are ambiguous, and the recording is skipped.
//   - participants.tsv ("Modality agnostic files"): per-participant columns,
//     participant_id first. One column may be chosen as the group of a
//     two-group comparison.
//
// Everything that is not used is reported with the reason: data types that
// are not recordings, formats amplink does not read, files that break the
// naming rules, companions that apply to no recording, recordings left out
// by the filter or without a group value.
package study
