package recipe

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"
)

// FieldError is a recipe error tied to a field path such as
// "analyses[0].seed.freq".
type FieldError struct {
	Field string
	Msg   string
}

func (e *FieldError) Error() string {
	if e.Field == "" {
		return e.Msg
	}
	return e.Field + ": " + e.Msg
}

// Errorf returns a *FieldError for field, for the packages that check a
// recipe against data (the analyses name the recipe field they refuse).
func Errorf(field, format string, args ...any) error {
	return &FieldError{Field: field, Msg: fmt.Sprintf(format, args...)}
}

func ferr(field, format string, args ...any) error { return Errorf(field, format, args...) }

// decodeJSON parses b into generic values, with numbers kept exact. Syntax
// errors, a truncated text, a key given twice in one object and anything but
// white space after the recipe object are errors with a line:column
// position. A leading UTF-8 byte order mark is skipped.
func decodeJSON(b []byte) (any, error) {
	b = bytes.TrimPrefix(b, []byte("\uFEFF"))
	if len(bytes.TrimSpace(b)) == 0 {
		return nil, errors.New("empty recipe")
	}
	// The syntax of the whole text first: json.Unmarshal's syntax errors
	// carry the offset from the start of b, and refuse data after the value.
	var raw json.RawMessage
	if err := json.Unmarshal(b, &raw); err != nil {
		var se *json.SyntaxError
		if errors.As(err, &se) {
			off := max(se.Offset-1, 0) // Offset counts the offending byte
			if strings.Contains(se.Error(), "unexpected end") {
				off = int64(len(b))
				line, col := position(b, off)
				return nil, fmt.Errorf("line %d, column %d: the recipe ends early (unexpected end of JSON input)", line, col)
			}
			line, col := position(b, off)
			if strings.Contains(se.Error(), "after top-level value") {
				return nil, fmt.Errorf("line %d, column %d: unexpected data after the recipe object", line, col)
			}
			return nil, fmt.Errorf("line %d, column %d: %v", line, col, err)
		}
		return nil, err
	}
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.UseNumber()
	v, err := walkValue(dec, b)
	if err != nil {
		return nil, err
	}
	if off := dec.InputOffset(); len(bytes.TrimSpace(b[off:])) > 0 {
		line, col := position(b, off+int64(len(b[off:])-len(bytes.TrimLeft(b[off:], " \t\r\n"))))
		return nil, fmt.Errorf("line %d, column %d: unexpected data after the recipe object", line, col)
	}
	return v, nil
}

// walkValue reads one value from dec token by token, so that a key given
// twice in an object is seen (json.Unmarshal keeps the last silently).
func walkValue(dec *json.Decoder, b []byte) (any, error) {
	tok, err := dec.Token()
	if err != nil {
		line, col := position(b, dec.InputOffset())
		return nil, fmt.Errorf("line %d, column %d: %v", line, col, err)
	}
	d, ok := tok.(json.Delim)
	if !ok {
		return tok, nil
	}
	switch d {
	case '{':
		m := map[string]any{}
		for dec.More() {
			kt, err := dec.Token()
			if err != nil {
				line, col := position(b, dec.InputOffset())
				return nil, fmt.Errorf("line %d, column %d: %v", line, col, err)
			}
			k, _ := kt.(string) // inside an object the decoder yields string keys only
			end := dec.InputOffset()
			if _, dup := m[k]; dup {
				// Point at the key's opening quote.
				start := bytes.LastIndexByte(b[:end-1], '"')
				line, col := position(b, int64(max(start, 0)))
				return nil, fmt.Errorf("line %d, column %d: key %q appears twice in one object", line, col, k)
			}
			v, err := walkValue(dec, b)
			if err != nil {
				return nil, err
			}
			m[k] = v
		}
		if _, err := dec.Token(); err != nil {
			line, col := position(b, dec.InputOffset())
			return nil, fmt.Errorf("line %d, column %d: %v", line, col, err)
		}
		return m, nil
	case '[':
		l := []any{}
		for dec.More() {
			v, err := walkValue(dec, b)
			if err != nil {
				return nil, err
			}
			l = append(l, v)
		}
		if _, err := dec.Token(); err != nil {
			line, col := position(b, dec.InputOffset())
			return nil, fmt.Errorf("line %d, column %d: %v", line, col, err)
		}
		return l, nil
	}
	line, col := position(b, dec.InputOffset())
	return nil, fmt.Errorf("line %d, column %d: unexpected %q", line, col, d)
}

func position(b []byte, off int64) (line, col int) {
	if off > int64(len(b)) {
		off = int64(len(b))
	}
	line, col = 1, 1
	for _, c := range b[:off] {
		if c == '\n' {
			line++
			col = 1
		} else {
			col++
		}
	}
	return line, col
}

// obj walks one JSON object, remembering which keys were read so that the
// rest can be reported as unknown.
type obj struct {
	path string
	m    map[string]any
	used map[string]bool
}

func asObj(path string, v any) (*obj, error) {
	m, ok := v.(map[string]any)
	if !ok {
		return nil, ferr(path, "must be an object, not %s", kind(v))
	}
	return &obj{path: path, m: m, used: map[string]bool{}}, nil
}

func (o *obj) field(k string) string {
	if o.path == "" {
		return k
	}
	return o.path + "." + k
}

func (o *obj) get(k string) (any, bool) {
	v, ok := o.m[k]
	if ok {
		o.used[k] = true
	}
	return v, ok
}

func (o *obj) has(k string) bool { _, ok := o.m[k]; return ok }

// done reports keys that were never read.
func (o *obj) done(allowed ...string) error {
	var extra []string
	for k := range o.m {
		if !o.used[k] {
			extra = append(extra, k)
		}
	}
	if len(extra) == 0 {
		return nil
	}
	sort.Strings(extra)
	var known []string
	for _, k := range allowed {
		known = append(known, k)
	}
	sort.Strings(known)
	msg := fmt.Sprintf("unknown key %q", extra[0])
	if len(extra) > 1 {
		msg = fmt.Sprintf("unknown keys %q", extra)
	}
	if len(known) > 0 {
		msg += " (known keys: " + strings.Join(known, ", ") + ")"
	}
	return ferr(o.path, "%s", msg)
}

func kind(v any) string {
	switch v.(type) {
	case nil:
		return "null"
	case bool:
		return "a boolean"
	case json.Number:
		return "a number"
	case string:
		return "a string"
	case []any:
		return "a list"
	case map[string]any:
		return "an object"
	}
	return fmt.Sprintf("%T", v)
}

func (o *obj) str(k string, dst *string) error {
	v, ok := o.get(k)
	if !ok {
		return nil
	}
	s, ok := v.(string)
	if !ok {
		return ferr(o.field(k), "must be a string, not %s", kind(v))
	}
	*dst = s
	return nil
}

func number(path string, v any) (float64, error) {
	n, ok := v.(json.Number)
	if !ok {
		return 0, ferr(path, "must be a number, not %s", kind(v))
	}
	f, err := n.Float64()
	if err != nil || math.IsInf(f, 0) || math.IsNaN(f) {
		return 0, ferr(path, "%s is not a finite number", n)
	}
	return f, nil
}

func (o *obj) num(k string, dst *float64) error {
	v, ok := o.get(k)
	if !ok {
		return nil
	}
	f, err := number(o.field(k), v)
	if err != nil {
		return err
	}
	*dst = f
	return nil
}

func (o *obj) integer(k string, dst *int, min, max int) error {
	v, ok := o.get(k)
	if !ok {
		return nil
	}
	f, err := number(o.field(k), v)
	if err != nil {
		return err
	}
	if f != math.Trunc(f) {
		return ferr(o.field(k), "must be a whole number, not %v", f)
	}
	if f < float64(min) || f > float64(max) {
		return ferr(o.field(k), "must be between %d and %d, not %v", min, max, f)
	}
	*dst = int(f)
	return nil
}

// pair reads a two-number list [lo, hi] with lo ≤ hi.
func (o *obj) pair(k string, dst *[2]float64, set *bool) error {
	v, ok := o.get(k)
	if !ok {
		return nil
	}
	l, ok := v.([]any)
	if !ok || len(l) != 2 {
		return ferr(o.field(k), "must be a list of two numbers [low, high]")
	}
	for i := range 2 {
		f, err := number(fmt.Sprintf("%s[%d]", o.field(k), i), l[i])
		if err != nil {
			return err
		}
		dst[i] = f
	}
	if dst[0] > dst[1] {
		return ferr(o.field(k), "range is reversed: [%g, %g]", dst[0], dst[1])
	}
	if set != nil {
		*set = true
	}
	return nil
}

// names reads a channel selection: a string, a list of strings, or "*".
func (o *obj) names(k string, dst *[]string) error {
	v, ok := o.get(k)
	if !ok {
		return nil
	}
	switch t := v.(type) {
	case string:
		if t == "" {
			return ferr(o.field(k), "empty channel name")
		}
		*dst = []string{t}
	case []any:
		if len(t) == 0 {
			return ferr(o.field(k), "empty channel list")
		}
		out := make([]string, len(t))
		seen := map[string]bool{}
		for i, e := range t {
			s, ok := e.(string)
			if !ok || s == "" {
				return ferr(fmt.Sprintf("%s[%d]", o.field(k), i), "must be a channel name")
			}
			if seen[s] {
				return ferr(fmt.Sprintf("%s[%d]", o.field(k), i), "channel %q is listed twice", s)
			}
			seen[s] = true
			out[i] = s
		}
		*dst = out
	default:
		return ferr(o.field(k), "must be a channel name, a list of names, or \"*\"")
	}
	return nil
}

func (o *obj) strs(k string, dst *[]string) error {
	v, ok := o.get(k)
	if !ok {
		return nil
	}
	l, ok := v.([]any)
	if !ok {
		return ferr(o.field(k), "must be a list of strings")
	}
	out := make([]string, len(l))
	for i, e := range l {
		s, ok := e.(string)
		if !ok || s == "" {
			return ferr(fmt.Sprintf("%s[%d]", o.field(k), i), "must be a non-empty string")
		}
		out[i] = s
	}
	*dst = out
	return nil
}
