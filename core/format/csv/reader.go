package csv

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"strings"

	"amplink/core/format"
)

// MaxLine is the longest line, in bytes, that a Reader accepts. A row of
// MaxChannels values of 15 characters each takes about 61 KiB.
const MaxLine = 1 << 20

const bom = "\xef\xbb\xbf"

// Reader splits delimited text into fields, one line at a time. It strips a
// leading UTF-8 byte order mark and the line ends (LF, CRLF or CR), skips blank
// lines, and trims spaces (and, with a comma delimiter, tabs) around every
// field. With a comma delimiter a field may be quoted as in RFC 4180 ("a ""b"""
// is a "b"), but a quoted field cannot span lines. With a tab delimiter,
// quotes are ordinary characters, as in IANA text/tab-separated-values. A
// field that QuoteCell protected from spreadsheets ('=1+2) reads back as it
// was (=1+2).
type Reader struct {
	// Comma is the field delimiter. Zero means detect it from the first
	// non-blank line: a tab if that line holds one, else a comma.
	Comma byte
	// Format names the reader in errors; "" means "csv".
	Format string

	name    string
	br      *bufio.Reader
	line    int
	off     int64
	fields  []string
	long    []byte
	pending []string // lines after a lone CR
	eof     bool
}

// NewReader returns a Reader over the bytes of f. The name of f is used
// only in error messages.
func NewReader(f format.File) *Reader {
	size := f.Size
	if size < 0 {
		size = 0
	}
	return &Reader{
		name: f.Name,
		br:   bufio.NewReaderSize(io.NewSectionReader(f.R, 0, size), 64<<10),
	}
}

// Offset returns the number of bytes consumed so far.
func (r *Reader) Offset() int64 { return r.off }

// Line returns the number of the last line read (1-based).
func (r *Reader) Line() int { return r.line }

// Header reads the first non-blank line, the header, like Read; an empty
// file is an error wrapping ErrNoData rather than io.EOF.
func (r *Reader) Header() ([]string, int, error) {
	hdr, line, err := r.Read()
	if err == io.EOF {
		return nil, 0, &format.Error{Format: r.format(), File: r.name, Offset: -1,
			Err: &Message{Text: "file is empty", Kind: ErrNoData}}
	}
	return hdr, line, err
}

// Read returns the fields of the next non-blank line and its 1-based line
// number. It returns io.EOF, and no fields, after the last line. The
// returned slice is reused by the next call; the strings in it stay valid.
func (r *Reader) Read() ([]string, int, error) {
	for {
		s, err := r.readLine()
		if err != nil {
			return nil, r.line, err
		}
		if isBlank(s) {
			continue
		}
		if r.Comma == 0 {
			r.Comma = ','
			if strings.IndexByte(s, '\t') >= 0 {
				r.Comma = '\t'
			}
		}
		if err := r.split(s); err != nil {
			return nil, r.line, err
		}
		return r.fields, r.line, nil
	}
}

// readLine returns the next line without its line end.
func (r *Reader) readLine() (string, error) {
	if len(r.pending) > 0 {
		s := r.pending[0]
		r.pending = r.pending[1:]
		r.line++
		return s, nil
	}
	if r.eof {
		return "", io.EOF
	}
	b, err := r.br.ReadSlice('\n')
	if err == bufio.ErrBufferFull {
		r.long = append(r.long[:0], b...)
		for err == bufio.ErrBufferFull {
			if len(r.long) > MaxLine {
				r.line++
				return "", r.Errorf(r.line, 0, format.ErrUnsupported, "line is longer than %d bytes", MaxLine)
			}
			b, err = r.br.ReadSlice('\n')
			r.long = append(r.long, b...)
		}
		b = r.long
	}
	switch {
	case err == io.EOF:
		r.eof = true
		if len(b) == 0 {
			return "", io.EOF
		}
	case err != nil:
		return "", &format.Error{Format: r.format(), File: r.name, Line: r.line + 1, Offset: -1, Err: err}
	}
	r.line++
	r.off += int64(len(b))
	if len(b) > MaxLine {
		return "", r.Errorf(r.line, 0, format.ErrUnsupported, "line is longer than %d bytes", MaxLine)
	}
	n := len(b)
	if n > 0 && b[n-1] == '\n' {
		n--
	}
	if n > 0 && b[n-1] == '\r' {
		n--
	}
	s := string(b[:n])
	if r.line == 1 {
		s = strings.TrimPrefix(s, bom)
	}
	if strings.IndexByte(s, '\r') >= 0 {
		// A lone CR ends a line too (old Mac text).
		parts := strings.Split(s, "\r")
		s, r.pending = parts[0], parts[1:]
	}
	return s, nil
}

func isBlank(s string) bool {
	for i := 0; i < len(s); i++ {
		if s[i] != ' ' && s[i] != '\t' {
			return false
		}
	}
	return true
}

// trim removes spaces, and tabs unless tab is the delimiter.
func (r *Reader) trim(s string) string {
	i, j := 0, len(s)
	for i < j && (s[i] == ' ' || (s[i] == '\t' && r.Comma != '\t')) {
		i++
	}
	for j > i && (s[j-1] == ' ' || (s[j-1] == '\t' && r.Comma != '\t')) {
		j--
	}
	return s[i:j]
}

// split splits line s into r.fields, taking off the apostrophe that
// QuoteCell puts before a cell a spreadsheet would run as a formula.
func (r *Reader) split(s string) error {
	if err := r.splitRaw(s); err != nil {
		return err
	}
	for i, f := range r.fields {
		if len(f) > 1 && f[0] == '\'' {
			r.fields[i] = UnquoteCell(f)
		}
	}
	return nil
}

func (r *Reader) splitRaw(s string) error {
	r.fields = r.fields[:0]
	if r.Comma == '\t' || strings.IndexByte(s, '"') < 0 {
		for {
			i := strings.IndexByte(s, r.Comma)
			if i < 0 {
				r.fields = append(r.fields, r.trim(s))
				return nil
			}
			r.fields = append(r.fields, r.trim(s[:i]))
			s = s[i+1:]
		}
	}
	for col := 1; ; col++ {
		s = r.trim(s)
		if !strings.HasPrefix(s, `"`) {
			i := strings.IndexByte(s, r.Comma)
			f := s
			if i >= 0 {
				f = s[:i]
			}
			if strings.IndexByte(f, '"') >= 0 {
				return r.Errorf(r.line, col, format.ErrSyntax, `bare " in a field that does not start with a quote`)
			}
			r.fields = append(r.fields, r.trim(f))
			if i < 0 {
				return nil
			}
			s = s[i+1:]
			continue
		}
		var b strings.Builder
		s = s[1:]
		for {
			i := strings.IndexByte(s, '"')
			if i < 0 {
				return r.Errorf(r.line, col, format.ErrSyntax, "quoted field does not end on this line")
			}
			b.WriteString(s[:i])
			s = s[i+1:]
			if strings.HasPrefix(s, `"`) {
				b.WriteByte('"')
				s = s[1:]
				continue
			}
			break
		}
		r.fields = append(r.fields, b.String())
		s = r.trim(s)
		if s == "" {
			return nil
		}
		if s[0] != r.Comma {
			return r.Errorf(r.line, col, format.ErrSyntax, "%q after the closing quote", s[:1])
		}
		s = s[1:]
	}
}

func (r *Reader) format() string {
	if r.Format == "" {
		return "csv"
	}
	return r.Format
}

// Errorf returns a *format.Error at line and column (1-based; 0 leaves it
// out) of the reader's file. The message is formatted from msg and args; the
// error wraps sentinel, which may be nil.
func (r *Reader) Errorf(line, col int, sentinel error, msg string, args ...any) error {
	return &format.Error{
		Format: r.format(), File: r.name, Line: line, Column: col, Offset: -1,
		Err: &Message{Text: fmt.Sprintf(msg, args...), Kind: sentinel},
	}
}

// Message is an error text that wraps a sentinel error (which may be nil)
// without repeating it, so that errors.Is works and the text stays short.
type Message struct {
	Text string
	Kind error
}

func (m *Message) Error() string { return m.Text }

// Unwrap returns the sentinel.
func (m *Message) Unwrap() error { return m.Kind }

// Sentinel errors of this package, wrapped inside *format.Error.
var (
	// ErrNoData: the file is empty or has a header only.
	ErrNoData = errors.New("no data")
	// ErrTimeAxis: the time column is not evenly spaced and increasing, or
	// trials do not share one time axis.
	ErrTimeAxis = errors.New("bad time axis")
)

// quote shortens s for a message.
func quote(s string) string {
	const max = 40
	if len(s) > max {
		s = s[:max] + "…"
	}
	return fmt.Sprintf("%q", s)
}
