package edf

import (
	"bytes"
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
	"time"

	"amplink/core/data"
)

// TestWriteGolden checks the writer's bytes against testdata/edf/ours.edf and
// ours.bdf, the files EDFlib read back in ours.*.edflib.txt. After a deliberate
// writer change: go test -run WriteGolden -update, then re-run check_edflib.c
// on both files (see SOURCE.txt) and commit its output.
func TestWriteGolden(t *testing.T) {
	for _, tc := range []struct {
		file string
		bdf  bool
	}{{"ours.edf", false}, {"ours.bdf", true}} {
		t.Run(tc.file, func(t *testing.T) {
			golden(t, tc.file, writeFixture(t, tc.bdf))
		})
	}
}

// TestWriteHeaderFields checks the header bytes field by field against the
// layout of Kemp et al. (1992) and Kemp & Olivan (2003), REFERENCES.md.
func TestWriteHeaderFields(t *testing.T) {
	b := writeFixture(t, false)
	// 3 channels + annotations: 4 signals, 5 records of 1 s (4.5 s padded).
	want := []struct {
		off, n int
		text   string
	}{
		{0, 8, "0       "},
		{8, 80, "X X X X" + strings.Repeat(" ", 73)},
		{88, 80, "Startdate 06-MAY-2024 X X X" + strings.Repeat(" ", 53)},
		{168, 8, "06.05.24"},
		{176, 8, "07.08.09"},
		{184, 8, "1280    "},
		{192, 44, "EDF+C" + strings.Repeat(" ", 39)},
		{236, 8, "5       "},
		{244, 8, "1       "},
		{252, 4, "4   "},
		{256, 64, "EEG Fz          EEG Cz          noise           EDF Annotations "},
		{256 + 4*96, 32, "uV      uV      mV              "},
		{256 + 4*120, 32, "-32768  -32768  -32768  -32768  "},
		{256 + 4*128, 32, "32767   32767   32767   32767   "},
		{256 + 4*216, 8, "250     "},
	}
	for _, w := range want {
		if got := string(b[w.off : w.off+w.n]); got != w.text {
			t.Errorf("offset %d: %q, want %q", w.off, got, w.text)
		}
	}
	for i, c := range b[:1280] {
		if c < 32 || c > 126 {
			t.Fatalf("header byte %d is %#x, not printable ASCII", i, c)
		}
	}
}

// TestRoundTrip writes and reads back random data: every sample must come
// back within one quantisation step (pmax − pmin)/(dmax − dmin).
func TestRoundTrip(t *testing.T) {
	tests := []struct {
		name     string
		rate     float64
		n        int
		scale    float64
		offset   float64
		opt      WriteOptions
		duration float64 // expected record duration
	}{
		{"edf 256 Hz µV", 256, 256 * 7, 50, 0, WriteOptions{}, 1},
		{"bdf 256 Hz µV", 256, 256*7 + 13, 50, 0, WriteOptions{BDF: true}, 1},
		{"edf volts", 1000, 3000, 2e-5, 1e-5, WriteOptions{}, 1},
		{"bdf large offset", 500, 1000, 10, 30000, WriteOptions{BDF: true}, 1},
		{"edf 100.5 Hz → 2 s records", 100.5, 603, 1, 0, WriteOptions{}, 2},
		{"bdf 0.5 s records", 200, 1000, 100, -50, WriteOptions{BDF: true, RecordDuration: 0.5}, 0.5},
		{"edf one sample", 10, 1, 3, 0, WriteOptions{}, 1},
	}
	for i, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(uint64(i), 3))
			r := &data.Recording{Name: tc.name, Rate: tc.rate}
			for c := 0; c < 3; c++ {
				r.Channels = append(r.Channels, data.Channel{Name: []string{"O1", "O2", "Oz"}[c], Type: "EEG", Unit: "uV"})
				s := make([]float32, tc.n)
				for k := range s {
					s[k] = float32(tc.offset + tc.scale*rng.NormFloat64())
				}
				if c == 2 {
					for k := range s {
						s[k] = float32(tc.offset) // constant channel
					}
				}
				r.Samples = append(r.Samples, s)
			}
			r.Events = []data.Event{{Onset: 0, Type: "start"}, {Onset: float64(tc.n) / tc.rate / 2, Duration: 0.125, Type: "mitte ü"}, {Onset: -0.5, Type: "before"}}
			var buf bytes.Buffer
			if err := Write(&buf, r, tc.opt); err != nil {
				t.Fatal(err)
			}
			got, h, err := decodeBytes("rt", buf.Bytes())
			if err != nil {
				t.Fatal(err)
			}
			if h.RecordDuration != tc.duration || h.BDF != tc.opt.BDF || !h.Plus {
				t.Errorf("record duration %v s, BDF %v, plus %v", h.RecordDuration, h.BDF, h.Plus)
			}
			if got.Rate != tc.rate {
				t.Errorf("rate %v, want %v", got.Rate, tc.rate)
			}
			spr := h.Signals[0].SamplesPerRecord
			if want := (tc.n + spr - 1) / spr * spr; got.Len() != want {
				t.Errorf("%d samples, want %d (%d padded to whole records)", got.Len(), want, tc.n)
			}
			wantCh := []data.Channel{
				{Name: "O1", Label: "EEG O1", Type: "EEG", Unit: "uV"},
				{Name: "O2", Label: "EEG O2", Type: "EEG", Unit: "uV"},
				{Name: "Oz", Label: "EEG Oz", Type: "EEG", Unit: "uV"},
			}
			if !equalChannels(got.Channels, wantCh) {
				t.Errorf("channels %+v", got.Channels)
			}
			for c := range r.Samples {
				s := h.Signals[c]
				step := s.Gain()
				if s.PhysMin > float64(minf(r.Samples[c])) || s.PhysMax < float64(maxf(r.Samples[c])) {
					t.Errorf("channel %d: range %v..%v does not hold the data", c, s.PhysMin, s.PhysMax)
				}
				for k, v := range got.Samples[c] {
					want := float64(r.Samples[c][min(k, tc.n-1)])
					if d := math.Abs(float64(v) - want); d > step+1e-7*math.Abs(want) {
						t.Fatalf("channel %d sample %d: %v, want %v within %v", c, k, v, want, step)
					}
				}
			}
			wantEv := []data.Event{r.Events[2], r.Events[0], r.Events[1]}
			if !equalEvents(got.Events, wantEv, 0) {
				t.Errorf("events %+v, want %+v", got.Events, wantEv)
			}
		})
	}
}

func minf(s []float32) float32 {
	m := s[0]
	for _, v := range s {
		m = min(m, v)
	}
	return m
}

func maxf(s []float32) float32 {
	m := s[0]
	for _, v := range s {
		m = max(m, v)
	}
	return m
}

// TestWriteErrors checks that bad recordings are refused with a message.
func TestWriteErrors(t *testing.T) {
	ok := func() *data.Recording {
		return &data.Recording{Name: "r", Rate: 100, Channels: []data.Channel{{Name: "A"}}, Samples: [][]float32{{1, 2, 3}}}
	}
	tests := []struct {
		name string
		edit func(r *data.Recording, o *WriteOptions)
		want string
	}{
		{"rate", func(r *data.Recording, o *WriteOptions) { r.Rate = 0 }, "edf: write r: sampling rate 0 Hz is not positive"},
		{"no channels", func(r *data.Recording, o *WriteOptions) { r.Channels, r.Samples = nil, nil }, "edf: write r: no channels"},
		{"ragged", func(r *data.Recording, o *WriteOptions) {
			r.Channels = append(r.Channels, data.Channel{Name: "B"})
			r.Samples = append(r.Samples, []float32{1})
		}, `edf: write r: channel "B" has 1 samples, channel "A" has 3`},
		{"nan", func(r *data.Recording, o *WriteOptions) { r.Samples[0][1] = float32(math.NaN()) }, `edf: write r: channel "A" sample 1 is NaN`},
		{"label", func(r *data.Recording, o *WriteOptions) { r.Channels[0].Label = "a label that is too long" }, `edf: write r: label "a label that is too long" is not 1 to 16 printable ASCII characters`},
		{"duration", func(r *data.Recording, o *WriteOptions) { o.RecordDuration = 0.015 }, "edf: write r: a record of 0.015 s holds 1.5 samples at 100 Hz, not a whole number"},
		{"rate π", func(r *data.Recording, o *WriteOptions) { r.Rate = math.Pi }, "edf: write r: no record of 1 to 60 s holds a whole number of samples at 3.141592653589793 Hz; set RecordDuration"},
		{"event text", func(r *data.Recording, o *WriteOptions) { r.Events = []data.Event{{Onset: 1, Type: "a\x14b"}} }, `edf: write r: event 1: text "a\x14b" is empty, not UTF-8 or holds \x00, \x14 or \x15`},
		{"year", func(r *data.Recording, o *WriteOptions) { o.Start = time.Date(2085, 1, 1, 0, 0, 0, 0, time.UTC) }, "edf: write r: start year 2085 is outside 1985–2084"},
		{"range", func(r *data.Recording, o *WriteOptions) { r.Samples[0][0] = 1 << 40 }, `edf: write r: channel "A": range 2..1.099511627776e+12 does not fit the 8-character fields`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r, o := ok(), WriteOptions{}
			tc.edit(r, &o)
			err := Write(&bytes.Buffer{}, r, o)
			if err == nil || err.Error() != tc.want {
				t.Errorf("error %v\nwant  %s", err, tc.want)
			}
		})
	}
	if err := Write(failWriter{}, ok(), WriteOptions{}); !errors.Is(err, errFail) {
		t.Errorf("writer error %v, want %v", err, errFail)
	}
}

var errFail = errors.New("disk full")

type failWriter struct{}

func (failWriter) Write([]byte) (int, error) { return 0, errFail }

// TestFmtNum checks the 8-character number fields, rounded outwards.
func TestFmtNum(t *testing.T) {
	tests := []struct {
		v    float64
		dir  int
		want string
	}{
		{-3276.8, -1, "-3276.8"},
		{3276.7, 1, "3276.7"},
		{0.123456789, 1, "0.123457"},
		{0.123456789, -1, "0.123456"},
		{-0.123456789, -1, "-0.12346"},
		{12345678.9, 1, "12345679"},
		{-1234567.89, -1, "-1234568"},
		{1e-9, -1, "0"},
		{-1e-9, 1, "0"},
		{1, 0, "1"},
	}
	for _, tc := range tests {
		got, err := fmtNum(tc.v, 8, tc.dir)
		if err != nil || got != tc.want {
			t.Errorf("fmtNum(%v, %d) = %q, %v; want %q", tc.v, tc.dir, got, err, tc.want)
		}
	}
	if _, err := fmtNum(123456789, 8, 0); err == nil {
		t.Error("fmtNum(123456789) fitted 8 characters")
	}
}
