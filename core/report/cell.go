package report

import "amplink/core/format/csv"

// QuoteCell is csv.QuoteCell: a leading apostrophe for a cell a
// spreadsheet would run as a formula.
func QuoteCell(s string) string { return csv.QuoteCell(s) }

// UnquoteCell is csv.UnquoteCell, which undoes QuoteCell.
func UnquoteCell(s string) string { return csv.UnquoteCell(s) }

// isJSONNumber reports whether s follows the JSON number grammar (RFC 8259
// section 6); see csv.IsNumber.
func isJSONNumber(s string) bool { return csv.IsNumber(s) }

// quoteCells and unquoteCells apply csv.QuoteCell and csv.UnquoteCell to
// a record (results.csv and the maps; see core/format/csv/cell.go).
func quoteCells(rec []string) []string {
	var out []string
	for i, c := range rec {
		if q := csv.QuoteCell(c); q != c {
			if out == nil {
				out = append([]string(nil), rec...)
			}
			out[i] = q
		}
	}
	if out == nil {
		return rec
	}
	return out
}

func unquoteCells(rec []string) {
	for i, c := range rec {
		rec[i] = csv.UnquoteCell(c)
	}
}
