package f32

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"math/bits"
	"sort"
	"strconv"
	"strings"

	"amplink/core/data"
	"amplink/core/format"
)

func init() {
	format.Register(format.Format{
		Name:   "f32",
		Ext:    []string{".f32"},
		Match:  MatchSidecar,
		Decode: Decode,
	})
}

// DefaultMaxBytes is the largest binary Reader accepts when MaxBytes is 0:
// 1 GiB of float32, the memory budget of one browser worker.
const DefaultMaxBytes = 1 << 30

// MaxSidecarBytes is the largest sidecar read (64 MiB).
const MaxSidecarBytes = 64 << 20

// chunkBytes is how much of the binary is read per ReadAt call.
const chunkBytes = 1 << 16

// Sidecar is the content of NAME.json. See the package comment.
type Sidecar struct {
	SampleRate float64  `json:"sampleRate"` // Hz
	Channels   []string `json:"channels"`
	Trials     int      `json:"trials"`
	Samples    int      `json:"samples"`              // per trial and channel
	Start      float64  `json:"start"`                // s, time of sample 0 relative to the event
	Units      string   `json:"units,omitempty"`      // physical unit of every channel, e.g. "uV"
	TrialTypes []string `json:"trialTypes,omitempty"` // one per trial; optional
}

// Reader decodes f32 epochs. The zero value is ready to use.
type Reader struct {
	// MaxBytes refuses binaries larger than this before allocating;
	// 0 means data.MaxSampleBytes when that is set,
	// else DefaultMaxBytes.
	MaxBytes int64
}

// MatchSidecar reports whether a dropped file is an f32 sidecar: its name
// ends in ".json" and its first bytes contain the key "sampleRate".
func MatchSidecar(head []byte, name string) bool {
	return strings.HasSuffix(strings.ToLower(name), ".json") && bytes.Contains(head, []byte(`"sampleRate"`))
}

// Decode decodes f with a zero Reader. It is the registered decoder.
func Decode(f format.File, sib format.Siblings) (*format.Data, error) {
	var r Reader
	return r.Decode(f, sib)
}

// Decode decodes f, which is either NAME.f32 or its NAME.json sidecar, and
// opens the other one through sib by its base name.
func (r *Reader) Decode(f format.File, sib format.Siblings) (*format.Data, error) {
	if sib == nil {
		sib = format.NoSiblings{}
	}
	base := baseName(f.Name)
	ext := ""
	if i := strings.LastIndexByte(base, '.'); i >= 0 {
		ext = base[i:]
	}
	stem := base[:len(base)-len(ext)]
	isSidecar := strings.EqualFold(ext, ".json")
	want := ".json"
	if isSidecar {
		want = ".f32"
	}
	if ext != "" && ext == strings.ToUpper(ext) {
		want = strings.ToUpper(want)
	}
	other, err := sib.Open(stem + want)
	if err != nil && want != strings.ToLower(want) {
		other, err = sib.Open(stem + strings.ToLower(want))
	}
	if err != nil {
		what := "sidecar"
		if isSidecar {
			what = "binary"
		}
		return nil, &format.Error{Format: "f32", File: f.Name, Offset: -1,
			Err: fmt.Errorf("needs its %s %s beside it: %w", what, stem+strings.ToLower(want), err)}
	}
	bin, side := f, other
	if isSidecar {
		bin, side = other, f
	}
	if side.Size > MaxSidecarBytes {
		return nil, &format.Error{Format: "f32", File: side.Name, Offset: -1,
			Err: fmt.Errorf("sidecar has %d bytes, more than the limit of %d: %w", side.Size, MaxSidecarBytes, format.ErrUnsupported)}
	}
	b, err := io.ReadAll(io.NewSectionReader(side.R, 0, side.Size))
	if err != nil {
		return nil, &format.Error{Format: "f32", File: side.Name, Offset: -1, Err: err}
	}
	sc, err := ParseSidecar(side.Name, b)
	if err != nil {
		return nil, err
	}
	e, err := r.Read(bin, side.Name, sc)
	if err != nil {
		return nil, err
	}
	e.Name = f.Name
	return &format.Data{Epochs: e}, nil
}

func baseName(name string) string {
	if i := strings.LastIndexAny(name, `/\`); i >= 0 {
		return name[i+1:]
	}
	return name
}

// field is one top-level key of the sidecar with the byte offset of its value.
type field struct {
	raw json.RawMessage
	off int64
}

var required = []string{"sampleRate", "channels", "trials", "samples", "start"}

var known = map[string]bool{
	"sampleRate": true, "channels": true, "trials": true, "samples": true,
	"start": true, "units": true, "trialTypes": true,
}

// ParseSidecar parses and checks the sidecar b; name is used in errors,
// which give the line and column of the offending value and the key.
func ParseSidecar(name string, b []byte) (*Sidecar, error) {
	b = bytes.TrimPrefix(b, []byte("\uFEFF")) // a UTF-8 byte order mark, as CSV accepts
	fields, err := topLevel(name, b)
	if err != nil {
		return nil, err
	}
	bad := func(key string, format_ string, args ...any) error {
		fl, ok := fields[key]
		off := int64(-1)
		if ok {
			off = fl.off
		}
		return posError(name, b, off, key, fmt.Errorf(format_, args...))
	}
	var unknown []string
	for k := range fields {
		if !known[k] {
			unknown = append(unknown, k)
		}
	}
	if len(unknown) > 0 {
		sort.Slice(unknown, func(i, j int) bool { return fields[unknown[i]].off < fields[unknown[j]].off })
		return nil, bad(unknown[0], "unknown key (keys are %s, units, trialTypes)", strings.Join(required, ", "))
	}
	for _, k := range required {
		if _, ok := fields[k]; !ok {
			return nil, posError(name, b, -1, k, errors.New("required key is missing"))
		}
	}
	sc := new(Sidecar)
	var err2 error
	if sc.SampleRate, err2 = number(fields["sampleRate"].raw); err2 != nil || !(sc.SampleRate > 0) {
		return nil, bad("sampleRate", "must be a positive number of Hz, got %s", short(fields["sampleRate"].raw))
	}
	if err := data.CheckRate(sc.SampleRate); err != nil {
		return nil, bad("sampleRate", "%v", err)
	}
	if sc.Start, err2 = number(fields["start"].raw); err2 != nil {
		return nil, bad("start", "must be a number of seconds, got %s", short(fields["start"].raw))
	}
	for _, k := range []string{"trials", "samples"} {
		v, err := count(fields[k].raw)
		if err != nil {
			return nil, bad(k, "must be a positive integer, got %s", short(fields[k].raw))
		}
		if k == "trials" {
			sc.Trials = v
		} else {
			sc.Samples = v
		}
	}
	chs, err := strs(fields["channels"].raw)
	if err != nil {
		return nil, bad("channels", "must be a list of channel names")
	}
	if len(chs) == 0 {
		return nil, bad("channels", "lists no channels")
	}
	seen := make(map[string]int, len(chs))
	for i, c := range chs {
		if strings.TrimSpace(c) == "" {
			return nil, bad("channels", "name %d of %d is empty", i+1, len(chs))
		}
		if j, ok := seen[c]; ok {
			return nil, bad("channels", "name %q appears twice (positions %d and %d)", c, j+1, i+1)
		}
		seen[c] = i
	}
	sc.Channels = chs
	if fl, ok := fields["units"]; ok {
		if err := json.Unmarshal(fl.raw, &sc.Units); err != nil {
			return nil, bad("units", "must be a string such as \"uV\", got %s", short(fl.raw))
		}
	}
	if fl, ok := fields["trialTypes"]; ok {
		tt, err := strs(fl.raw)
		if err != nil {
			return nil, bad("trialTypes", "must be a list of strings")
		}
		if len(tt) != sc.Trials {
			return nil, bad("trialTypes", "has %d entries for %d trials", len(tt), sc.Trials)
		}
		sc.TrialTypes = tt
	}
	return sc, nil
}

// topLevel splits the JSON object b into its keys, remembering where each
// value starts.
func topLevel(name string, b []byte) (map[string]field, error) {
	dec := json.NewDecoder(bytes.NewReader(b))
	fail := func(err error) error {
		var se *json.SyntaxError
		if errors.As(err, &se) {
			return posError(name, b, se.Offset, "", fmt.Errorf("%w: %v", format.ErrSyntax, se))
		}
		if err == io.EOF || err == io.ErrUnexpectedEOF {
			return posError(name, b, int64(len(b)), "", fmt.Errorf("%w: JSON ends early", format.ErrSyntax))
		}
		return posError(name, b, dec.InputOffset(), "", fmt.Errorf("%w: %v", format.ErrSyntax, err))
	}
	// Check the syntax of the whole text first: json.Unmarshal reports
	// offsets from the start of b, the Decoder from the start of a value.
	var whole json.RawMessage
	if err := json.Unmarshal(b, &whole); err != nil {
		var se *json.SyntaxError
		if errors.As(err, &se) {
			// Offset counts the bytes read, including the offending one.
			return nil, posError(name, b, se.Offset-1, "", fmt.Errorf("%w: %v", format.ErrSyntax, se))
		}
		return nil, fail(err)
	}
	tok, err := dec.Token()
	if err != nil {
		return nil, fail(err)
	}
	if d, ok := tok.(json.Delim); !ok || d != '{' {
		return nil, posError(name, b, 0, "", fmt.Errorf("%w: the sidecar must be a JSON object", format.ErrSyntax))
	}
	fields := map[string]field{}
	for dec.More() {
		tok, err := dec.Token()
		if err != nil {
			return nil, fail(err)
		}
		key, _ := tok.(string) // inside an object the decoder only yields string keys
		off := valueStart(b, dec.InputOffset())
		var raw json.RawMessage
		if err := dec.Decode(&raw); err != nil {
			return nil, fail(err)
		}
		if _, dup := fields[key]; dup {
			return nil, posError(name, b, off, key, errors.New("key appears twice"))
		}
		fields[key] = field{raw: raw, off: off}
	}
	if _, err := dec.Token(); err != nil {
		return nil, fail(err)
	}
	if _, err := dec.Token(); err != io.EOF {
		return nil, posError(name, b, dec.InputOffset(), "", fmt.Errorf("%w: data after the JSON object", format.ErrSyntax))
	}
	return fields, nil
}

// valueStart skips the colon and white space after a key ending at off.
func valueStart(b []byte, off int64) int64 {
	for off < int64(len(b)) {
		switch b[off] {
		case ' ', '\t', '\r', '\n', ':':
			off++
		default:
			return off
		}
	}
	return off
}

// posError builds an error at byte offset off of the text b, given as
// line and column when off is known.
func posError(name string, b []byte, off int64, key string, err error) error {
	e := &format.Error{Format: "f32", File: name, Offset: -1, Field: key, Err: err}
	if off >= 0 {
		if off > int64(len(b)) {
			off = int64(len(b))
		}
		pre := b[:off]
		e.Line = 1 + bytes.Count(pre, []byte{'\n'})
		e.Column = int(off) - (bytes.LastIndexByte(pre, '\n') + 1) + 1
	}
	return e
}

func short(raw json.RawMessage) string {
	s := string(raw)
	if len(s) > 40 {
		s = s[:37] + "..."
	}
	return s
}

func number(raw json.RawMessage) (float64, error) {
	var n json.Number
	if len(raw) > 0 && raw[0] == '"' {
		return 0, errors.New("f32: a string, not a number")
	}
	if err := json.Unmarshal(raw, &n); err != nil {
		return 0, err
	}
	v, err := strconv.ParseFloat(string(n), 64)
	if err != nil || math.IsInf(v, 0) {
		return 0, fmt.Errorf("f32: %s out of range", n)
	}
	return v, nil
}

// maxCount keeps every product of three counts inside int64.
const maxCount = 1 << 31

func count(raw json.RawMessage) (int, error) {
	v, err := number(raw)
	if err != nil {
		return 0, err
	}
	if v != math.Trunc(v) || v < 1 || v >= maxCount {
		return 0, errors.New("f32: not a positive integer")
	}
	return int(v), nil
}

func strs(raw json.RawMessage) ([]string, error) {
	var s []string
	if len(raw) > 0 && raw[0] != '[' {
		return nil, errors.New("f32: not a list")
	}
	if err := json.Unmarshal(raw, &s); err != nil {
		return nil, err
	}
	return s, nil
}

// Read decodes the binary bin described by sc; sidecarName is used in
// messages. It checks that bin.Size is exactly trials·channels·samples·4
// before allocating, then reads in chunks of 64 KiB.
func (r *Reader) Read(bin format.File, sidecarName string, sc *Sidecar) (*data.Epochs, error) {
	nc := len(sc.Channels)
	if sc.Trials <= 0 || sc.Samples <= 0 || nc == 0 || !(sc.SampleRate > 0) {
		return nil, &format.Error{Format: "f32", File: sidecarName, Offset: -1,
			Err: fmt.Errorf("describes %d trials × %d channels × %d samples at %g Hz", sc.Trials, nc, sc.Samples, sc.SampleRate)}
	}
	hi, n := bits.Mul64(uint64(sc.Trials), uint64(nc))
	hi2, n := bits.Mul64(n, uint64(sc.Samples))
	if hi != 0 || hi2 != 0 || n > math.MaxInt64/4 {
		return nil, &format.Error{Format: "f32", File: sidecarName, Offset: -1, Field: "trials, channels, samples",
			Err: fmt.Errorf("%d·%d·%d values do not fit in a file: %w", sc.Trials, nc, sc.Samples, format.ErrUnsupported)}
	}
	need := int64(n) * 4
	if bin.Size != need {
		return nil, &format.Error{Format: "f32", File: bin.Name, Offset: -1,
			Err: fmt.Errorf("has %d bytes, but sidecar %s (trials·channels·samples·4) needs %d·%d·%d·4 = %d bytes",
				bin.Size, sidecarName, sc.Trials, nc, sc.Samples, need)}
	}
	limit := r.MaxBytes
	if limit <= 0 {
		limit = data.MaxSampleBytes // the caller's sample budget (amplink run --max-memory, a page worker)
	}
	if limit <= 0 {
		limit = DefaultMaxBytes
	}
	if need > limit {
		return nil, &format.Error{Format: "f32", File: bin.Name, Offset: -1,
			Err: fmt.Errorf("%d bytes exceed the limit of %d bytes: %w", need, limit, format.ErrUnsupported)}
	}
	chans := make([]data.Channel, nc)
	for i, c := range sc.Channels {
		chans[i] = data.Channel{Name: c, Unit: sc.Units}
	}
	e := data.NewEpochs(sc.SampleRate, sc.Start, chans, sc.Trials, sc.Samples)
	e.Name = bin.Name
	if sc.TrialTypes != nil {
		e.TrialInfo = make([]data.Event, sc.Trials)
		for i, t := range sc.TrialTypes {
			e.TrialInfo[i].Type = t
		}
	}
	bufLen := int64(chunkBytes)
	if need < bufLen {
		bufLen = need
	}
	buf := make([]byte, bufLen)
	dst := e.Data
	for off := int64(0); off < need; {
		m := need - off
		if m > bufLen {
			m = bufLen
		}
		p := buf[:m]
		k, err := bin.R.ReadAt(p, off)
		if int64(k) < m {
			if err == nil || err == io.EOF {
				err = format.ErrTruncated
			}
			return nil, &format.Error{Format: "f32", File: bin.Name, Offset: off + int64(k), Err: err}
		}
		for i := 0; i < len(p); i += 4 {
			u := binary.LittleEndian.Uint32(p[i:])
			if u&0x7f800000 == 0x7f800000 {
				at := off + int64(i)
				idx := int(at / 4)
				t, c := idx/(nc*sc.Samples), idx/sc.Samples%nc
				what := "infinite"
				if u&0x007fffff != 0 {
					what = "NaN"
				}
				return nil, &format.Error{Format: "f32", File: bin.Name, Offset: at,
					Err: fmt.Errorf("value is %s (trial %d, channel %s, sample %d)", what, t+1, sc.Channels[c], idx%sc.Samples+1)}
			}
			dst[i/4] = math.Float32frombits(u)
		}
		dst = dst[len(p)/4:]
		off += m
	}
	return e, nil
}

// Write writes e as a binary to bin and its sidecar JSON to sidecar. All
// channels must share one unit (or have none), names must be unique and
// non-empty, and no value may be NaN or infinite; nothing is written when
// a check fails. Trial types are written when e.TrialInfo has any.
func Write(bin io.Writer, sidecar io.Writer, e *data.Epochs) error {
	if err := e.Validate(); err != nil {
		return fmt.Errorf("f32: %s: %w", e.Name, err)
	}
	nc := len(e.Channels)
	sc := Sidecar{SampleRate: e.Rate, Channels: make([]string, nc), Trials: e.NTrials, Samples: e.NSamples, Start: e.Start}
	if math.IsNaN(e.Start) || math.IsInf(e.Start, 0) {
		return fmt.Errorf("f32: %s: start %v is not a finite time", e.Name, e.Start)
	}
	seen := map[string]bool{}
	for i, c := range e.Channels {
		if strings.TrimSpace(c.Name) == "" {
			return fmt.Errorf("f32: %s: channel %d has no name", e.Name, i+1)
		}
		if seen[c.Name] {
			return fmt.Errorf("f32: %s: channel name %q appears twice", e.Name, c.Name)
		}
		seen[c.Name] = true
		sc.Channels[i] = c.Name
		if c.Unit != e.Channels[0].Unit {
			return fmt.Errorf("f32: %s: channels %s (%q) and %s (%q) have different units; the sidecar holds one",
				e.Name, e.Channels[0].Name, e.Channels[0].Unit, c.Name, c.Unit)
		}
	}
	sc.Units = e.Channels[0].Unit
	if e.TrialInfo != nil {
		tt := make([]string, e.NTrials)
		has := false
		for i, ev := range e.TrialInfo {
			tt[i] = ev.Type
			has = has || ev.Type != ""
		}
		if has {
			sc.TrialTypes = tt
		}
	}
	for i, v := range e.Data {
		if math.IsNaN(float64(v)) || math.IsInf(float64(v), 0) {
			t, c := i/(nc*e.NSamples), i/e.NSamples%nc
			return fmt.Errorf("f32: %s: trial %d, channel %s, sample %d is %v", e.Name, t+1, e.Channels[c].Name, i%e.NSamples+1, v)
		}
	}
	j, err := json.MarshalIndent(&sc, "", "  ")
	if err != nil {
		return fmt.Errorf("f32: %s: %w", e.Name, err)
	}
	if _, err := sidecar.Write(append(j, '\n')); err != nil {
		return fmt.Errorf("f32: %s: writing sidecar: %w", e.Name, err)
	}
	buf := make([]byte, 0, chunkBytes)
	for i, v := range e.Data {
		buf = binary.LittleEndian.AppendUint32(buf, math.Float32bits(v))
		if len(buf) == cap(buf) || i == len(e.Data)-1 {
			if _, err := bin.Write(buf); err != nil {
				return fmt.Errorf("f32: %s: writing binary: %w", e.Name, err)
			}
			buf = buf[:0]
		}
	}
	return nil
}
