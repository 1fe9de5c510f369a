// Package edf reads and writes EDF, EDF+ and BDF (BDF+) recordings.
//
// Layout (Kemp et al. 1992; Kemp & Olivan 2003): a 256-byte fixed header,
// then 256 bytes per signal stored field by field across all signals, then
// data records. Each data record holds, for every signal in turn, that
// signal's samples for one record duration: 16-bit little-endian two's
// complement in EDF, 24-bit in BDF. A digital value d is scaled to the
// physical unit of its signal as
//
//	physical = pmin + (d − dmin)·(pmax − pmin)/(dmax − dmin)
//
// EDF+ and BDF+ files (reserved field "EDF+C", "EDF+D", "BDF+C", "BDF+D")
// carry annotations in signals labelled "EDF Annotations" (or "BDF
// Annotations"), as time-stamped annotation lists (TALs):
//
//	+onset[\x15duration]\x14text\x14...\x00
//
// The first TAL of each record's first annotation signal is the record's time
// stamp, "+t\x14\x14\x00", in seconds after the header's start date and time.
//
// Decode streams the data records through one reused buffer into one
// preallocated []float32 per kept channel, so a file needs little more memory
// than its float32 samples. Header values are checked against the file size
// before anything is allocated. Errors are *format.Error values that name
// the file, the byte offset and the header field, and wrap
// format.ErrSyntax, format.ErrTruncated or format.ErrUnsupported.
//
// Importing the package registers the formats "edf" (magic "0" and seven
// spaces) and "bdf" (magic "\xffBIOSEMI") with package format.
package edf
