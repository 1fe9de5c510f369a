// Package format detects and decodes recordings from bytes.
//
// Each format lives in its own sub-package and registers itself with
// Register from an init function, as image formats do. Import
// amplink/core/format/all to register every format.
package format

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"sort"
	"strings"
	"sync"

	"amplink/core/data"
)

// File is one input: bytes plus the name used in messages.
type File struct {
	Name string
	R    io.ReaderAt
	Size int64
}

// Bytes wraps an in-memory file.
func Bytes(name string, b []byte) File {
	return File{Name: name, R: bytes.NewReader(b), Size: int64(len(b))}
}

// Siblings opens files that sit beside the main one (a JSON sidecar, an
// events.tsv). It returns an error wrapping ErrNoSibling when the file is absent.
type Siblings interface {
	Open(name string) (File, error)
}

// ErrNoSibling is returned by Siblings.Open for a missing file.
var ErrNoSibling = errors.New("no such file")

// NoSiblings has no files.
type NoSiblings struct{}

// Open always fails.
func (NoSiblings) Open(name string) (File, error) {
	return File{}, fmt.Errorf("%s: %w", name, ErrNoSibling)
}

// Data is what a decoder returns: exactly one of Recording or Epochs is set.
type Data struct {
	Recording *data.Recording
	Epochs    *data.Epochs
}

// Format describes one registered format.
type Format struct {
	Name string
	// Magic is matched against the first bytes; '?' matches any byte.
	// Empty means the format is found by Match or by extension only.
	Magic string
	// Ext lists lower-case file extensions (with the dot) that select this
	// format when no magic matches, e.g. ".f32".
	Ext []string
	// Match, if set, is tried after the magic and extensions: it sees the first
	// bytes and the name.
	Match  func(head []byte, name string) bool
	Decode func(f File, sib Siblings) (*Data, error)
	// Open, if set, reads a continuous format without its samples: the
	// Recording it returns is streamed (data.Recording.Source) and reads
	// them from f on demand. Decode is used where Open is nil.
	Open func(f File, sib Siblings) (*Data, error)
	// Fallback formats are tried last (CSV/TSV text).
	Fallback bool
}

var (
	mu      sync.RWMutex
	formats []Format
)

// Register adds a format. It panics on a duplicate name (a programming error).
func Register(f Format) {
	mu.Lock()
	defer mu.Unlock()
	for _, g := range formats {
		if g.Name == f.Name {
			panic("format: duplicate format " + f.Name)
		}
	}
	formats = append(formats, f)
}

// Names lists the registered formats.
func Names() []string {
	mu.RLock()
	defer mu.RUnlock()
	var out []string
	for _, f := range formats {
		out = append(out, f.Name)
	}
	sort.Strings(out)
	return out
}

func match(magic string, b []byte) bool {
	if len(magic) > len(b) {
		return false
	}
	for i := 0; i < len(magic); i++ {
		if magic[i] != '?' && magic[i] != b[i] {
			return false
		}
	}
	return true
}

// HeadLen is how many bytes Detect looks at.
const HeadLen = 512

// Detect returns the format for a file given its first bytes and its name.
func Detect(head []byte, name string) (Format, bool) {
	mu.RLock()
	defer mu.RUnlock()
	for _, f := range formats {
		if f.Magic != "" && match(f.Magic, head) {
			return f, true
		}
	}
	lname := strings.ToLower(name)
	for _, f := range formats {
		for _, e := range f.Ext {
			if strings.HasSuffix(lname, e) {
				return f, true
			}
		}
	}
	for _, f := range formats {
		if f.Match != nil && f.Match(head, name) {
			return f, true
		}
	}
	for _, f := range formats {
		if f.Fallback {
			return f, true
		}
	}
	return Format{}, false
}

// ErrUnknown is returned when no registered format fits.
var ErrUnknown = errors.New("unknown format")

// Decode detects the format of f and decodes it.
func Decode(f File, sib Siblings) (*Data, error) {
	return decode(f, sib, false)
}

// Open detects the format of f and opens it streamed where the format can
// (Format.Open), so that a continuous recording's samples stay in f until
// they are read; other formats are decoded whole, as Decode does. f must
// stay readable while the data are used.
func Open(f File, sib Siblings) (*Data, error) {
	return decode(f, sib, true)
}

func decode(f File, sib Siblings, stream bool) (*Data, error) {
	if sib == nil {
		sib = NoSiblings{}
	}
	n := int64(HeadLen)
	if f.Size < n {
		n = f.Size
	}
	head := make([]byte, n)
	if _, err := f.R.ReadAt(head, 0); err != nil && err != io.EOF {
		return nil, fmt.Errorf("%s: %w", f.Name, err)
	}
	if f.Size == 0 {
		return nil, fmt.Errorf("%s: empty file", f.Name)
	}
	ft, ok := Detect(head, f.Name)
	if !ok {
		return nil, fmt.Errorf("%s: %w (formats: %s)", f.Name, ErrUnknown, strings.Join(Names(), ", "))
	}
	dec := ft.Decode
	if stream && ft.Open != nil {
		dec = ft.Open
	}
	d, err := dec(f, sib)
	if err != nil {
		return nil, err
	}
	if (d.Recording == nil) == (d.Epochs == nil) {
		return nil, fmt.Errorf("format: %s decoder returned no data for %s", ft.Name, f.Name)
	}
	if d.Recording != nil && d.Recording.Format == "" {
		d.Recording.Format = ft.Name
	}
	if d.Epochs != nil && d.Epochs.Format == "" {
		d.Epochs.Format = ft.Name
	}
	return d, nil
}

// Error is a decoding error with a position. Fields that do not apply are
// zero. It prints as "name:line:col: msg" or "name: offset N (field): msg".
type Error struct {
	Format string // e.g. "csv", "edf"
	File   string
	Line   int   // 1-based; 0 if not applicable
	Column int   // 1-based; 0 if not applicable
	Offset int64 // byte offset; -1 if not applicable
	Field  string
	Err    error
}

func (e *Error) Error() string {
	var b strings.Builder
	if e.Format != "" {
		b.WriteString(e.Format + ": ")
	}
	b.WriteString(e.File)
	switch {
	case e.Line > 0 && e.Column > 0:
		fmt.Fprintf(&b, ":%d:%d", e.Line, e.Column)
	case e.Line > 0:
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	if e.Offset >= 0 && e.Line == 0 {
		fmt.Fprintf(&b, ": offset %d", e.Offset)
	}
	if e.Field != "" {
		fmt.Fprintf(&b, " (%s)", e.Field)
	}
	b.WriteString(": ")
	b.WriteString(e.Err.Error())
	return b.String()
}

func (e *Error) Unwrap() error { return e.Err }

// Sentinel errors wrapped by readers.
var (
	ErrTruncated   = errors.New("file is truncated")
	ErrUnsupported = errors.New("unsupported")
	ErrSyntax      = errors.New("syntax error")
)
