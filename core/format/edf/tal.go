package edf

import (
	"strconv"
	"unicode/utf8"

	"amplink/core/format"
)

// A tal is one time-stamped annotation list:
// +onset[\x15duration]\x14text\x14...\x00.
type tal struct {
	onset  float64 // seconds after the header start time
	dur    float64 // seconds; 0 when absent
	hasDur bool
	texts  []string
	off    int64 // file offset of the '+' or '-'
}

// talScanner parses the TALs of one annotation signal in one record.
type talScanner struct {
	p    *parser
	b    []byte
	base int64 // file offset of b[0]
	i    int
}

func (sc *talScanner) errf(at int, msg string, args ...any) error {
	return sc.p.errf(sc.base+int64(at), "annotation", format.ErrSyntax, msg, args...)
}

// next returns the next TAL; ok is false at the end of the signal.
func (sc *talScanner) next(t *tal) (ok bool, err error) {
	b := sc.b
	for sc.i < len(b) && b[sc.i] == 0 {
		sc.i++
	}
	if sc.i >= len(b) {
		return false, nil
	}
	start := sc.i
	*t = tal{off: sc.base + int64(start), texts: t.texts[:0]}
	if b[sc.i] != '+' && b[sc.i] != '-' {
		return false, sc.errf(sc.i, "TAL starts with %q, not '+' or '-'", b[sc.i])
	}
	num := func(signed bool) (float64, int, bool) {
		j := sc.i
		if signed {
			j++
		}
		d, dot := 0, false
		for j < len(b) && (b[j] >= '0' && b[j] <= '9' || b[j] == '.' && !dot) {
			if b[j] == '.' {
				dot = true
			} else {
				d++
			}
			j++
		}
		if d == 0 {
			return 0, j, false
		}
		v, err := strconv.ParseFloat(string(b[sc.i:j]), 64)
		return v, j, err == nil
	}
	v, j, good := num(true)
	if !good {
		return false, sc.errf(sc.i, "TAL onset %q is not a number", printable(b[sc.i:j]))
	}
	t.onset = v
	sc.i = j
	if sc.i < len(b) && b[sc.i] == 0x15 {
		sc.i++
		v, j, good = num(false)
		if !good {
			return false, sc.errf(sc.i, "TAL duration %q is not a number", printable(b[sc.i:j]))
		}
		t.dur, t.hasDur = v, true
		sc.i = j
	}
	if sc.i >= len(b) {
		return false, sc.errf(start, "TAL is cut off by the end of the annotation signal")
	}
	if b[sc.i] != 0x14 {
		return false, sc.errf(sc.i, "TAL onset is followed by %q, not \\x14 or \\x15", b[sc.i])
	}
	sc.i++
	for {
		if sc.i >= len(b) {
			return false, sc.errf(start, "TAL is cut off by the end of the annotation signal")
		}
		if b[sc.i] == 0 {
			sc.i++
			return true, nil
		}
		j := sc.i
		for j < len(b) && b[j] != 0x14 && b[j] != 0 {
			j++
		}
		if j >= len(b) || b[j] == 0 {
			return false, sc.errf(sc.i, "annotation text is not terminated by \\x14")
		}
		txt := b[sc.i:j]
		if !utf8.Valid(txt) {
			return false, sc.errf(sc.i, "annotation text is not UTF-8")
		}
		t.texts = append(t.texts, string(txt))
		sc.i = j + 1
	}
}

// printable quotes at most 16 bytes of b for a message.
func printable(b []byte) string {
	if len(b) > 16 {
		b = b[:16]
	}
	return string(b)
}
