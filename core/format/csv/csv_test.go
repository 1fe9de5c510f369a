package csv

import (
	"bytes"
	"encoding/json"
	"errors"
	"flag"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"amplink/core/data"
	"amplink/core/format"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata/csv")

const dir = "../../../testdata/csv"

func open(t testing.TB, name string) format.File {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, name))
	if err != nil {
		t.Fatal(err)
	}
	return format.Bytes(name, b)
}

// refFile is one entry of testdata/csv/ref.json (numpy 1.24.2, written by
// testdata/csv/make_ref.py).
type refFile struct {
	Kind     string    `json:"kind"`
	Rate     float64   `json:"rate"`
	RateRtol float64   `json:"rate_rtol"`
	Start    float64   `json:"start"`
	Channels []string  `json:"channels"`
	Trials   []string  `json:"trials"`
	NSamples int       `json:"nsamples"`
	Values   []float64 `json:"values"`
}

func loadRef(t *testing.T) map[string]refFile {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, "ref.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Numpy string             `json:"numpy"`
		Files map[string]refFile `json:"files"`
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if ref.Numpy == "" || len(ref.Files) == 0 {
		t.Fatal("ref.json has no numpy version or no files")
	}
	return ref.Files
}

// TestDecodeValid compares every valid fixture with the float32 values,
// channel names, trial ids and nominal rate and start recorded by numpy
// 1.24.2 in testdata/csv/ref.json (testdata/csv/make_ref.py).
func TestDecodeValid(t *testing.T) {
	ref := loadRef(t)
	// Every valid fixture must be in ref.json, so none goes unchecked.
	all, _ := filepath.Glob(filepath.Join(dir, "*.?sv"))
	for _, p := range all {
		n := filepath.Base(p)
		if strings.HasPrefix(n, "invalid-") || strings.HasPrefix(n, "trials") {
			continue
		}
		if _, ok := ref[n]; !ok {
			t.Errorf("%s is not listed in ref.json", n)
		}
	}
	for name, want := range ref {
		t.Run(name, func(t *testing.T) {
			d, err := Decode(open(t, name))
			if err != nil {
				t.Fatal(err)
			}
			var (
				rate, start float64
				chs         []data.Channel
				got         []float32
				ns          int
			)
			switch want.Kind {
			case "epochs":
				e := d.Epochs
				if e == nil || d.Recording != nil {
					t.Fatalf("got %+v, want epochs only", d)
				}
				if err := e.Validate(); err != nil {
					t.Fatal(err)
				}
				rate, start, chs, got, ns = e.Rate, e.Start, e.Channels, e.Data, e.NSamples
				var ids []string
				for _, ti := range e.TrialInfo {
					if ti.Type != "" {
						t.Errorf("trial type %q, want empty", ti.Type)
					}
					ids = append(ids, ti.Extra["trial"])
				}
				if !reflect.DeepEqual(ids, want.Trials) {
					t.Errorf("trial ids %q, want %q", ids, want.Trials)
				}
			case "recording":
				r := d.Recording
				if r == nil || d.Epochs != nil {
					t.Fatalf("got %+v, want a recording only", d)
				}
				rate, start, chs, ns = r.Rate, r.Start, r.Channels, r.Len()
				for _, s := range r.Samples {
					got = append(got, s...)
				}
			default:
				t.Fatalf("unknown kind %q in ref.json", want.Kind)
			}
			if names := data.Names(chs); !reflect.DeepEqual(names, want.Channels) {
				t.Errorf("channels %q, want %q", names, want.Channels)
			}
			if want.RateRtol == 0 && rate != want.Rate || math.Abs(rate-want.Rate) > want.RateRtol*want.Rate {
				t.Errorf("rate %v Hz, want %v (rtol %g)", rate, want.Rate, want.RateRtol)
			}
			if math.Abs(start-want.Start) > 1e-12 {
				t.Errorf("start %v s, want %v", start, want.Start)
			}
			if ns != want.NSamples {
				t.Errorf("%d samples, want %d", ns, want.NSamples)
			}
			if len(got) != len(want.Values) {
				t.Fatalf("%d values, want %d", len(got), len(want.Values))
			}
			for i, v := range want.Values {
				if got[i] != float32(v) {
					t.Fatalf("value %d = %v, want %v (numpy float32)", i, got[i], float32(v))
				}
			}
		})
	}
}

// invalidCases lists every testdata/csv/invalid-* file with the exact error
// expected (the golden check of the error messages) and a sentinel it wraps.
var invalidCases = []struct {
	file string
	want string
	is   error
}{
	{"invalid-empty.csv", `csv: invalid-empty.csv: file is empty`, ErrNoData},
	// Rates no recording can have (data.MaxRate, 1 MHz).
	{"invalid-rate-1e300.csv", `csv: invalid-rate-1e300.csv:4: times from 0 to 2e-300 s over 3 samples: sample rate 1e+300 Hz is above the limit of 1 MHz; no EEG, MEG, LFP or sound-card recording is sampled that fast (amplifiers sample at up to tens of kHz, sound cards at up to 768 kHz), so the header or time axis is wrong: impossible sample rate`, ErrTimeAxis},
	{"invalid-rate-epoched-1ns.csv", `csv: invalid-rate-epoched-1ns.csv:4: times from 0 to 2e-09 s over 3 samples: sample rate 1e+09 Hz is above the limit of 1 MHz; no EEG, MEG, LFP or sound-card recording is sampled that fast (amplifiers sample at up to tens of kHz, sound cards at up to 768 kHz), so the header or time axis is wrong: impossible sample rate`, ErrTimeAxis},
	{"invalid-blank.csv", `csv: invalid-blank.csv: file is empty`, ErrNoData},
	{"invalid-header-only.csv", `csv: invalid-header-only.csv:1: header only; no data rows follow`, ErrNoData},
	{"invalid-no-channels.csv", `csv: invalid-no-channels.csv:1: header has no channel columns after time`, format.ErrSyntax},
	{"invalid-first-column.csv", `csv: invalid-first-column.csv:1:1: first header column is "t"; the header must start with trial,time (epoched) or time (continuous), separated by commas or tabs`, format.ErrSyntax},
	{"invalid-second-column.csv", `csv: invalid-second-column.csv:1:2: second header column is "Fz"; an epoched file starts trial,time,<channel>...`, format.ErrSyntax},
	{"invalid-events.csv", `csv: invalid-events.csv:1:1: first header column is "onset": this looks like an events table, not samples; the header must start with trial,time or time`, format.ErrSyntax},
	{"invalid-dup-channel.csv", `csv: invalid-dup-channel.csv:1:4: duplicate channel name "Fz" (also column 2)`, format.ErrSyntax},
	{"invalid-empty-name.csv", `csv: invalid-empty-name.csv:1:3: channel name is empty`, format.ErrSyntax},
	{"invalid-ragged-short.csv", `csv: invalid-ragged-short.csv:3:2: row has 2 fields; the header has 3`, format.ErrSyntax},
	{"invalid-ragged-long.csv", `csv: invalid-ragged-long.csv:3:4: row has 4 fields; the header has 3`, format.ErrSyntax},
	{"invalid-number.csv", `csv: invalid-number.csv:3:3: "abc" is not a number`, format.ErrSyntax},
	{"invalid-empty-value.csv", `csv: invalid-empty-value.csv:2:3: value is empty`, format.ErrSyntax},
	{"invalid-nan.csv", `csv: invalid-nan.csv:3:2: "NaN" is not a finite number`, format.ErrSyntax},
	{"invalid-inf.csv", `csv: invalid-inf.csv:3:3: "-Inf" is not a finite number`, format.ErrSyntax},
	{"invalid-range.csv", `csv: invalid-range.csv:3:2: "1e39" is out of range for float32`, format.ErrSyntax},
	{"invalid-time.csv", `csv: invalid-time.csv:3:1: time "later" is not a finite number`, format.ErrSyntax},
	{"invalid-decreasing.csv", `csv: invalid-decreasing.csv:4:1: time 0.1 s is not after 0.1 s on the row before; times must increase`, ErrTimeAxis},
	{"invalid-uneven.csv", `csv: invalid-uneven.csv:5:1: time step 0.15 s differs from the earlier steps (0.1 s) by more than 1%; times must be evenly spaced`, ErrTimeAxis},
	{"invalid-one-sample.csv", `csv: invalid-one-sample.csv:2: the file has one sample; at least two are needed to find the sample rate`, ErrTimeAxis},
	{"invalid-unequal-trials.csv", `csv: invalid-unequal-trials.csv:6:1: trial "2" ends after 2 samples; trial "1" has 3`, ErrTimeAxis},
	{"invalid-last-trial-short.csv", `csv: invalid-last-trial-short.csv:6:1: trial "2" ends after 2 samples; trial "1" has 3`, ErrTimeAxis},
	{"invalid-long-trial.csv", `csv: invalid-long-trial.csv:6:1: trial "2" has more than 2 samples, the length of trial "1"`, ErrTimeAxis},
	{"invalid-trial-times.csv", `csv: invalid-trial-times.csv:4:2: time 0.05 s differs from 0 s at sample 1 of trial "1"; all trials must share one time axis`, ErrTimeAxis},
	{"invalid-trial-again.csv", `csv: invalid-trial-again.csv:6:1: trial "1" appears again after trial "2"; its rows start at line 2 and must be contiguous`, format.ErrSyntax},
	{"invalid-trial-id.csv", `csv: invalid-trial-id.csv:4:1: trial id is empty`, format.ErrSyntax},
	{"invalid-quote.csv", `csv: invalid-quote.csv:1:2: quoted field does not end on this line`, format.ErrSyntax},
	{"invalid-bare-quote.csv", `csv: invalid-bare-quote.csv:1:2: bare " in a field that does not start with a quote`, format.ErrSyntax},
	{"invalid-utf16.csv", `csv: invalid-utf16.csv:1: not a text file (NUL bytes in the first line); UTF-16 text must be saved as UTF-8`, format.ErrUnsupported},
	{"invalid-after-quote.csv", `csv: invalid-after-quote.csv:1:2: "x" after the closing quote`, format.ErrSyntax},
}

func TestDecodeInvalid(t *testing.T) {
	listed := map[string]bool{}
	for _, tc := range invalidCases {
		listed[tc.file] = true
		t.Run(tc.file, func(t *testing.T) {
			d, err := Decode(open(t, tc.file))
			if d != nil {
				t.Errorf("got data %+v with the error", d)
			}
			if err == nil {
				t.Fatalf("no error, want %s", tc.want)
			}
			if err.Error() != tc.want {
				t.Errorf("error\n got %s\nwant %s", err, tc.want)
			}
			var fe *format.Error
			if !errors.As(err, &fe) || fe.Format != "csv" || fe.File != tc.file {
				t.Errorf("error %#v is not a *format.Error for csv %s", err, tc.file)
			}
			if !errors.Is(err, tc.is) {
				t.Errorf("error %v does not wrap %v", err, tc.is)
			}
		})
	}
	all, _ := filepath.Glob(filepath.Join(dir, "invalid-*"))
	for _, p := range all {
		if !listed[filepath.Base(p)] {
			t.Errorf("%s has no expected error in invalidCases", filepath.Base(p))
		}
	}
}

// TestReaderFields checks the field splitting against the quoting rules of
// RFC 4180 and IANA text/tab-separated-values (common practice).
func TestReaderFields(t *testing.T) {
	for _, tc := range []struct {
		name, in string
		want     [][]string
	}{
		{"plain", "a,b,c\n1,2,3\n", [][]string{{"a", "b", "c"}, {"1", "2", "3"}}},
		{"trim", "x,y,z\n a ,\tb\t, c\n", [][]string{{"x", "y", "z"}, {"a", "b", "c"}}},
		{"tab detected", "a,b\tc\n", [][]string{{"a,b", "c"}}},
		{"empty fields", "a,,\n", [][]string{{"a", "", ""}}},
		{"quoted", `"a,b","say ""x""", "c" ` + "\n", [][]string{{"a,b", `say "x"`, "c"}}},
		{"quoted keeps spaces", `" a ",b` + "\n", [][]string{{" a ", "b"}}},
		{"tab", "a b\t\"c\"\t d \n", [][]string{{"a b", `"c"`, "d"}}},
		{"tab keeps empty", "a\t\tb\n", [][]string{{"a", "", "b"}}},
		{"bom crlf blank", "\xef\xbb\xbfa,b\r\n\r\n  \r\n1,2\r\n", [][]string{{"a", "b"}, {"1", "2"}}},
		{"lone CR", "a,b\r1,2\r\r\n3,4\n", [][]string{{"a", "b"}, {"1", "2"}, {"3", "4"}}},
		{"no final newline", "a,b\n1,2", [][]string{{"a", "b"}, {"1", "2"}}},
		{"long line", "x," + strings.Repeat("y", 100000) + "\n", [][]string{{"x", strings.Repeat("y", 100000)}}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r := NewReader(format.Bytes("t.csv", []byte(tc.in)))
			var got [][]string
			for {
				fs, _, err := r.Read()
				if err != nil {
					if err.Error() != "EOF" {
						t.Fatal(err)
					}
					break
				}
				got = append(got, append([]string(nil), fs...))
			}
			if !reflect.DeepEqual(got, tc.want) {
				t.Errorf("got %q, want %q", got, tc.want)
			}
		})
	}
}

func TestReaderLineTooLong(t *testing.T) {
	in := "a," + strings.Repeat("y", MaxLine+10) + "\n"
	_, _, err := NewReader(format.Bytes("big.csv", []byte(in))).Read()
	want := "csv: big.csv:1: line is longer than 1048576 bytes"
	if err == nil || err.Error() != want {
		t.Fatalf("error %v, want %s", err, want)
	}
}

func TestTooManyChannels(t *testing.T) {
	var b strings.Builder
	b.WriteString("time")
	for i := 0; i <= MaxChannels; i++ {
		b.WriteString(",c" + strconv.Itoa(i))
	}
	_, err := Decode(format.Bytes("wide.csv", []byte(b.String()+"\n")))
	want := "csv: wide.csv:1: header has 4097 channel columns; at most 4096 are supported"
	if err == nil || err.Error() != want {
		t.Fatalf("error %v, want %s", err, want)
	}
}

func TestDecodeTrials(t *testing.T) {
	// Expected values: the text of testdata/csv/trials.csv (made by
	// make_ref.py), unquoted as RFC 4180 says.
	want := &Table{
		Columns: []string{"trial", "rt", "condition"},
		Rows: [][]string{
			{"1", "0.412", "easy"},
			{"2", "n/a", "hard, late"},
			{"3", "0.388", "easy"},
		},
	}
	for _, tc := range []struct {
		file string
		want *Table
		err  string
	}{
		{"trials.csv", want, ""},
		{"trials-invalid-dup.csv", nil, `csv: trials-invalid-dup.csv:4:1: trial "1" is listed again (first at line 2)`},
		{"trials-invalid-header.csv", nil, `csv: trials-invalid-header.csv:1:1: first header column is "id"; a trials table starts trial,<name>...`},
		{"invalid-header-only.csv", nil, `csv: invalid-header-only.csv:1:1: first header column is "time"; a trials table starts trial,<name>...`},
		{"invalid-empty.csv", nil, `csv: invalid-empty.csv: file is empty`},
		{"invalid-ragged-short.csv", nil, `csv: invalid-ragged-short.csv:1:1: first header column is "time"; a trials table starts trial,<name>...`},
	} {
		t.Run(tc.file, func(t *testing.T) {
			got, err := DecodeTrials(open(t, tc.file))
			if tc.err != "" {
				if err == nil || err.Error() != tc.err {
					t.Fatalf("error %v, want %s", err, tc.err)
				}
				if got != nil {
					t.Errorf("got %+v with the error", got)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if !reflect.DeepEqual(got, tc.want) {
				t.Errorf("got %q, want %q", got, tc.want)
			}
			if got.Column("condition") != 2 || got.Column("none") != -1 {
				t.Errorf("Column: condition at %d, none at %d", got.Column("condition"), got.Column("none"))
			}
			if r := got.Row("2"); r == nil || r[1] != "n/a" {
				t.Errorf("Row(2) = %q", r)
			}
		})
	}
	for _, tc := range []struct{ name, in, want string }{
		{"ragged", "trial,a\n1,2,3\n", `csv: t.csv:2:3: row has 3 fields; the header has 2`},
		{"only trial", "trial\n1\n", `csv: t.csv:1: header has no columns after trial`},
		{"header only", "trial,a\n", `csv: t.csv:1: header only; no trial rows follow`},
		{"dup column", "trial,a,a\n1,2,3\n", `csv: t.csv:1:3: duplicate column name "a" (also column 2)`},
		{"empty id", "trial,a\n,2\n", `csv: t.csv:2:1: trial id is empty`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := DecodeTrials(format.Bytes("t.csv", []byte(tc.in)))
			if err == nil || err.Error() != tc.want {
				t.Fatalf("error %v, want %s", err, tc.want)
			}
		})
	}
}

func randomEpochs(rng *rand.Rand, rate, start float64, nch, ntr, ns int) *data.Epochs {
	chs := make([]data.Channel, nch)
	for c := range chs {
		chs[c].Name = "ch" + string(rune('A'+c))
	}
	e := data.NewEpochs(rate, start, chs, ntr, ns)
	for i := range e.Data {
		// A wide spread of magnitudes, signs and exponents.
		e.Data[i] = float32(rng.NormFloat64() * math.Pow(10, float64(rng.IntN(20)-10)))
	}
	return e
}

// TestRoundTrip writes epochs and recordings and reads them back: the
// float32 values must be identical, and the rate exact when it has at most 6
// decimals (else within 1e-12 relative).
func TestRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, tc := range []struct {
		name        string
		rate, start float64
		exact       bool
		ids         []string
	}{
		{"250Hz", 250, -1, true, nil},
		{"1000/3Hz", 1000.0 / 3, -0.25, false, nil},
		{"2048Hz", 2048, 0.123, true, []string{"a,b", `q"x`, " sp ", "t\tab"}},
		{"0.5Hz", 0.5, 1e6, true, []string{"1", "2", "3", "4"}},
		{"44100Hz", 44100, 0, true, nil},
	} {
		t.Run(tc.name, func(t *testing.T) {
			e := randomEpochs(rng, tc.rate, tc.start, 3, 4, 37)
			e.Channels[1].Name = `odd, "name"`
			if tc.ids != nil {
				e.TrialInfo = make([]data.Event, len(tc.ids))
				for i, id := range tc.ids {
					e.TrialInfo[i].Extra = map[string]string{"trial": id}
				}
			}
			var buf bytes.Buffer
			if err := WriteEpochs(&buf, e); err != nil {
				t.Fatal(err)
			}
			d, err := Decode(format.Bytes("rt.csv", buf.Bytes()))
			if err != nil {
				t.Fatal(err)
			}
			g := d.Epochs
			checkRate(t, g.Rate, tc.rate, tc.exact)
			if g.Start != tc.start {
				t.Errorf("start %v, want %v", g.Start, tc.start)
			}
			if !reflect.DeepEqual(g.Channels, e.Channels) || g.NTrials != e.NTrials || g.NSamples != e.NSamples {
				t.Fatalf("shape %v %d×%d, want %v %d×%d", g.Channels, g.NTrials, g.NSamples, e.Channels, e.NTrials, e.NSamples)
			}
			if !reflect.DeepEqual(g.Data, e.Data) {
				t.Errorf("values differ after the round trip")
			}
			for i := range g.TrialInfo {
				want := strconv.Itoa(i + 1)
				if tc.ids != nil {
					want = tc.ids[i]
				}
				if got := g.TrialInfo[i].Extra["trial"]; got != want {
					t.Errorf("trial %d id %q, want %q", i, got, want)
				}
			}

			r := &data.Recording{Name: "r", Rate: tc.rate, Start: tc.start, Channels: e.Channels}
			for c := range e.Channels {
				r.Samples = append(r.Samples, e.Trial(1, c))
			}
			buf.Reset()
			if err := WriteRecording(&buf, r); err != nil {
				t.Fatal(err)
			}
			d, err = Decode(format.Bytes("rt.csv", buf.Bytes()))
			if err != nil {
				t.Fatal(err)
			}
			checkRate(t, d.Recording.Rate, tc.rate, tc.exact)
			if d.Recording.Start != tc.start || !reflect.DeepEqual(d.Recording.Samples, r.Samples) {
				t.Errorf("recording differs after the round trip")
			}
		})
	}
}

func checkRate(t *testing.T, got, want float64, exact bool) {
	t.Helper()
	if exact && got != want || math.Abs(got-want) > 1e-12*want {
		t.Errorf("rate %v, want %v (exact %v)", got, want, exact)
	}
}

func TestWriteErrors(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	nan := randomEpochs(rng, 100, 0, 2, 2, 5)
	nan.Data[7] = float32(math.NaN())
	badName := randomEpochs(rng, 100, 0, 2, 2, 5)
	badName.Channels[0].Name = "a\nb"
	bad := randomEpochs(rng, 100, 0, 2, 2, 5)
	bad.Data = bad.Data[:3]
	for _, tc := range []struct {
		name string
		e    *data.Epochs
		want string
	}{
		{"nan", nan, "csv: : trial 1, channel chB, sample 3 is NaN; only finite values can be written"},
		{"newline", badName, `csv: : channel name "a\nb" cannot be written`},
		{"invalid", bad, "csv: : data: 3 values for 2×2×5"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			err := WriteEpochs(&bytes.Buffer{}, tc.e)
			if err == nil || err.Error() != tc.want {
				t.Fatalf("error %v, want %s", err, tc.want)
			}
		})
	}
	r := &data.Recording{Rate: 0, Channels: []data.Channel{{Name: "a"}}, Samples: [][]float32{{1}}}
	if err := WriteRecording(&bytes.Buffer{}, r); err == nil {
		t.Error("rate 0: no error")
	}
	r.Rate = 10
	r.Samples[0][0] = float32(math.Inf(1))
	if err := WriteRecording(&bytes.Buffer{}, r); err == nil {
		t.Error("Inf value: no error")
	}
}

// TestWriteGolden compares the writers' text with golden files
// (testdata/csv/write-*.golden, checked by hand against the rules in
// WriteEpochs: shortest float64 times, shortest float32 values, quoting).
// A mismatch writes a .got file beside the golden one; -update rewrites it.
func TestWriteGolden(t *testing.T) {
	e := data.NewEpochs(4, -0.5, []data.Channel{{Name: "Fz"}, {Name: "a,b"}}, 2, 3)
	copy(e.Data, []float32{1, 0.1, -2.5e-7, 3, 1e10, -0, 0.33333334, 7, 8, 9, 10, 11})
	e.TrialInfo = []data.Event{{Extra: map[string]string{"trial": "go"}}, {Extra: map[string]string{"trial": "stop"}}}
	r := &data.Recording{Rate: 3, Start: 0.1, Channels: []data.Channel{{Name: " x "}},
		Samples: [][]float32{{1.5, -1, 0.2}}}
	for _, tc := range []struct {
		golden string
		write  func(*bytes.Buffer) error
	}{
		{"write-epochs.golden", func(b *bytes.Buffer) error { return WriteEpochs(b, e) }},
		{"write-recording.golden", func(b *bytes.Buffer) error { return WriteRecording(b, r) }},
	} {
		t.Run(tc.golden, func(t *testing.T) {
			var b bytes.Buffer
			if err := tc.write(&b); err != nil {
				t.Fatal(err)
			}
			path := filepath.Join(dir, tc.golden)
			if *update {
				if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(b.Bytes(), want) {
				got := strings.TrimSuffix(path, ".golden") + ".got"
				os.WriteFile(got, b.Bytes(), 0o644)
				t.Errorf("output differs from %s; see %s", path, got)
			}
		})
	}
}

// TestRegistered checks that the package registers "csv" as the fallback of
// the format registry and that format.Decode reaches it.
func TestRegistered(t *testing.T) {
	f, ok := format.Detect([]byte("whatever,text"), "x.dat")
	if !ok || f.Name != "csv" || !f.Fallback {
		t.Fatalf("Detect gave %q, %v; want the csv fallback", f.Name, ok)
	}
	d, err := format.Decode(open(t, "epoched.csv"), nil)
	if err != nil {
		t.Fatal(err)
	}
	if d.Epochs == nil || d.Epochs.Format != "csv" || d.Epochs.Name != "epoched.csv" {
		t.Errorf("format.Decode gave %+v", d)
	}
	_, err = format.Decode(open(t, "invalid-number.csv"), nil)
	if err == nil || !strings.HasPrefix(err.Error(), "csv: invalid-number.csv:3:3:") {
		t.Errorf("error %v", err)
	}
}
