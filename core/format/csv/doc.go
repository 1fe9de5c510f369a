// Package csv reads and writes recordings as delimited text: comma-separated
// (CSV, RFC 4180) or tab-separated (TSV).
//
// Two layouts are understood, told apart by the header line:
//
//	trial,time,<channel>...   epoched: one row per sample per trial
//	time,<channel>...         continuous: one row per sample
//
// The header names are trimmed of spaces and "trial" and "time" are matched
// case-insensitively. A leading UTF-8 byte order mark, CRLF line ends and
// blank lines are accepted. The delimiter is a tab when the header line holds
// one, and a comma otherwise.
//
// The sample rate in Hz comes from the time column (seconds); see Decode for
// the rules. Samples are stored as float32.
//
// Every error is a *format.Error that names the file, the line and the
// column, where the column is the 1-based field number (as a spreadsheet
// shows it), not a byte count. Importing the package registers the "csv"
// format as the fallback of amplink/core/format.
package csv
