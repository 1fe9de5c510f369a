package report

import "strings"

// SafeName keeps ASCII letters, digits, '-', '_' and '.' of s and replaces
// every other character by repl, so that s can name a file.
func SafeName(s string, repl rune) string {
	return strings.Map(func(r rune) rune {
		switch {
		case r >= 'a' && r <= 'z', r >= 'A' && r <= 'Z', r >= '0' && r <= '9', r == '-', r == '_', r == '.':
			return r
		}
		return repl
	}, s)
}
