package csv

// Spreadsheets execute a cell that begins with =, +, - or @ as a formula
// (and some treat a leading tab or carriage return the same way), so a
// channel named "=1+2" must not reach a CSV or TSV file as written. The usual
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
		return !IsNumber(s)
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

// IsNumber reports whether s follows the JSON number grammar (RFC 8259
// section 6): -?(0|[1-9][0-9]*)(\.[0-9]+)?([eE][+-]?[0-9]+)?
func IsNumber(s string) bool {
	i := 0
	digits := func() int {
		j := i
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
		}
		return i - j
	}
	if i < len(s) && s[i] == '-' {
		i++
	}
	switch {
	case i < len(s) && s[i] == '0':
		i++
	case digits() == 0:
		return false
	}
	if i < len(s) && s[i] == '.' {
		i++
		if digits() == 0 {
			return false
		}
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		i++
		if i < len(s) && (s[i] == '+' || s[i] == '-') {
			i++
		}
		if digits() == 0 {
			return false
		}
	}
	return i == len(s)
}
