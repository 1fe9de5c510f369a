package report

// Spreadsheets execute a cell that begins with =, +, - or @ as a formula
// (and some treat a leading tab or carriage return the same way), so a
// channel named "=1+2" must not reach results.csv as written. The usual
// defence (common practice, OWASP "CSV injection") is a leading apostrophe,
// which spreadsheets show as text and hide.

// needsQuote reports whether s would be taken for a formula, or is an
// apostrophe followed by such a cell (so that QuoteCell stays invertible).
// Numbers, negative ones included, are left alone.
func needsQuote(s string) bool {
	if s == "" {
		return false
	}
	switch s[0] {
	case '=', '@', '\t', '\r':
		return true
	case '+', '-':
		return !isJSONNumber(s)
	case '\'':
		return needsQuote(s[1:])
	}
	return false
}

// QuoteCell returns s with a leading apostrophe when a spreadsheet would
// execute it as a formula: s begins with =, @, a tab, a carriage return, or
// with + or - without being a number. Numbers stay as they are.
func QuoteCell(s string) string {
	if needsQuote(s) {
		return "'" + s
	}
	return s
}

// UnquoteCell undoes QuoteCell.
func UnquoteCell(s string) string {
	if len(s) > 1 && s[0] == '\'' && needsQuote(s[1:]) {
		return s[1:]
	}
	return s
}

func quoteCells(rec []string) []string {
	var out []string
	for i, c := range rec {
		if q := QuoteCell(c); q != c {
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
		rec[i] = UnquoteCell(c)
	}
}
