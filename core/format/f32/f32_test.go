package f32

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"amplink/core/data"
	"amplink/core/format"
)

const dir = "../../../testdata/f32"

// dirSib opens siblings from a directory, as a CLI would.
type dirSib string

func (d dirSib) Open(name string) (format.File, error) {
	b, err := os.ReadFile(filepath.Join(string(d), name))
	if err != nil {
		return format.File{}, fmt.Errorf("%s: %w", name, format.ErrNoSibling)
	}
	return format.Bytes(name, b), nil
}

// mapSib holds siblings in memory, as the browser does.
type mapSib map[string][]byte

func (m mapSib) Open(name string) (format.File, error) {
	b, ok := m[name]
	if !ok {
		return format.File{}, fmt.Errorf("%s: %w", name, format.ErrNoSibling)
	}
	return format.Bytes(name, b), nil
}

func decodeFile(t *testing.T, name string) (*format.Data, error) {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, name))
	if err != nil {
		t.Fatal(err)
	}
	return format.Decode(format.Bytes(name, b), dirSib(dir))
}

// TestReference decodes small.f32, written by numpy, from either of its two
// files, and compares every value with what numpy reads back.
func TestReference(t *testing.T) {
	// numpy 1.24.2 tofile/fromfile '<f4', testdata/f32/make_ref.py
	var ref struct {
		Shape  []int
		Values []float64
	}
	b, err := os.ReadFile(filepath.Join(dir, "small.ref.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"small.f32", "small.json"} {
		t.Run(name, func(t *testing.T) {
			d, err := decodeFile(t, name)
			if err != nil {
				t.Fatal(err)
			}
			e := d.Epochs
			if e == nil {
				t.Fatal("no epochs")
			}
			if err := e.Validate(); err != nil {
				t.Fatal(err)
			}
			got := fmt.Sprintf("%s %s rate=%g start=%g %d×%v×%d unit=%s", e.Name, e.Format, e.Rate, e.Start,
				e.NTrials, data.Names(e.Channels), e.NSamples, e.Channels[0].Unit)
			want := name + " f32 rate=250 start=-0.008 2×[Fz Cz Pz]×5 unit=uV"
			if got != want {
				t.Errorf("got  %s\nwant %s", got, want)
			}
			if s := []int{e.NTrials, len(e.Channels), e.NSamples}; fmt.Sprint(s) != fmt.Sprint(ref.Shape) {
				t.Fatalf("shape %v, numpy %v", s, ref.Shape)
			}
			for i, v := range e.Data {
				if float64(v) != ref.Values[i] {
					t.Fatalf("value %d = %v, numpy %v", i, v, ref.Values[i])
				}
			}
			// Layout [trial][channel][sample]: make_ref.py stores 100t+10c+s/4-0.1.
			if v := e.Trial(1, 2)[3]; v != float32(100+20+0.75-0.1) {
				t.Errorf("trial 1, channel 2, sample 3 = %v", v)
			}
			if e.TrialInfo != nil {
				t.Errorf("TrialInfo = %v, want nil without trialTypes", e.TrialInfo)
			}
		})
	}
}

func TestTrialTypes(t *testing.T) {
	d, err := decodeFile(t, "types.f32")
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, ev := range d.Epochs.TrialInfo {
		got = append(got, ev.Type)
	}
	if fmt.Sprint(got) != "[tone noise]" {
		t.Errorf("trial types %v, want [tone noise] (testdata/f32/types.json)", got)
	}
}

// TestInvalid reads the broken pairs written by testdata/f32/make_ref.py.
func TestInvalid(t *testing.T) {
	for _, tc := range []struct {
		file     string
		want     string
		sentinel error
	}{
		{"invalid-size.f32", "f32: invalid-size.f32: has 96 bytes, but sidecar invalid-size.json (trials·channels·samples·4) needs 2·3·5·4 = 120 bytes", nil},
		{"invalid-size.json", "f32: invalid-size.f32: has 96 bytes, but sidecar invalid-size.json (trials·channels·samples·4) needs 2·3·5·4 = 120 bytes", nil},
		{"invalid-missing.f32", "f32: invalid-missing.json (start): required key is missing", nil},
		{"invalid-unknown.f32", "f32: invalid-unknown.json:12:16 (sampelRate): unknown key (keys are sampleRate, channels, trials, samples, start, units, trialTypes)", nil},
		{"invalid-nan.f32", "f32: invalid-nan.f32: offset 112: value is NaN (trial 2, channel Pz, sample 4)", nil},
		{"invalid-inf.f32", "f32: invalid-inf.f32: offset 20: value is infinite (trial 1, channel Cz, sample 1)", nil},
		{"invalid-syntax.f32", "f32: invalid-syntax.json:2:20: syntax error: invalid character '\"' after array element", format.ErrSyntax},
		{"invalid-types.f32", "f32: invalid-types.json:12:16 (trialTypes): has 1 entries for 2 trials", nil},
		{"invalid-trials.json", "f32: invalid-trials.json:8:12 (trials): must be a positive integer, got 2.5", nil},
	} {
		t.Run(tc.file, func(t *testing.T) {
			_, err := decodeFile(t, tc.file)
			if err == nil {
				t.Fatal("no error")
			}
			if err.Error() != tc.want {
				t.Errorf("got  %s\nwant %s", err, tc.want)
			}
			var fe *format.Error
			if !errors.As(err, &fe) {
				t.Errorf("%T is not a *format.Error", err)
			}
			if tc.sentinel != nil && !errors.Is(err, tc.sentinel) {
				t.Errorf("error does not wrap %v", tc.sentinel)
			}
		})
	}
}

// TestSidecarErrors covers sidecar checks that need no binary.
func TestSidecarErrors(t *testing.T) {
	const ok = `"sampleRate": 500, "channels": ["A"], "trials": 1, "samples": 2, "start": 0`
	for _, tc := range []struct{ name, json, want string }{
		{"rate zero", `{"sampleRate": 0, "channels": ["A"], "trials": 1, "samples": 2, "start": 0}`,
			"f32: s.json:1:16 (sampleRate): must be a positive number of Hz, got 0"},
		{"rate 1e9 Hz", `{"sampleRate": 1e9, "channels": ["A"], "trials": 1, "samples": 2, "start": 0}`,
			"f32: s.json:1:16 (sampleRate): sample rate 1e+09 Hz is above the limit of 1 MHz; no EEG, MEG, LFP or sound-card recording is sampled that fast (amplifiers sample at up to tens of kHz, sound cards at up to 768 kHz), so the header or time axis is wrong: impossible sample rate"},
		{"duplicate key after a BOM", "\uFEFF{" + ok + `, "start": 1}`,
			"f32: s.json:1:88 (start): key appears twice"},
		{"trailing brace", `{` + ok + `}}`, "f32: s.json:1:78: syntax error: invalid character '}' after top-level value"},
		{"rate string", `{"sampleRate": "500", "channels": ["A"], "trials": 1, "samples": 2, "start": 0}`,
			`f32: s.json:1:16 (sampleRate): must be a positive number of Hz, got "500"`},
		{"no channels", `{"sampleRate": 5, "channels": [], "trials": 1, "samples": 2, "start": 0}`,
			"f32: s.json:1:31 (channels): lists no channels"},
		{"duplicate channel", `{"sampleRate": 5, "channels": ["A", "A"], "trials": 1, "samples": 2, "start": 0}`,
			`f32: s.json:1:31 (channels): name "A" appears twice (positions 1 and 2)`},
		{"empty channel", `{"sampleRate": 5, "channels": ["A", " "], "trials": 1, "samples": 2, "start": 0}`,
			"f32: s.json:1:31 (channels): name 2 of 2 is empty"},
		{"channels not list", `{"sampleRate": 5, "channels": "A", "trials": 1, "samples": 2, "start": 0}`,
			"f32: s.json:1:31 (channels): must be a list of channel names"},
		{"negative samples", `{"sampleRate": 5, "channels": ["A"], "trials": 1, "samples": -2, "start": 0}`,
			"f32: s.json:1:62 (samples): must be a positive integer, got -2"},
		{"huge trials", `{"sampleRate": 5, "channels": ["A"], "trials": 1e300, "samples": 2, "start": 0}`,
			"f32: s.json:1:48 (trials): must be a positive integer, got 1e300"},
		{"units number", `{` + ok + `, "units": 3}`,
			"f32: s.json:1:88 (units): must be a string such as \"uV\", got 3"},
		{"duplicate key", `{` + ok + `, "start": 1}`,
			"f32: s.json:1:88 (start): key appears twice"},
		{"not object", `[1]`, "f32: s.json:1:1: syntax error: the sidecar must be a JSON object"},
		{"trailing", `{` + ok + `} {}`, "f32: s.json:1:79: syntax error: invalid character '{' after top-level value"},
		{"empty", ``, "f32: s.json: syntax error: unexpected end of JSON input"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ParseSidecar("s.json", []byte(tc.json))
			if err == nil {
				t.Fatal("no error")
			}
			if err.Error() != tc.want {
				t.Errorf("got  %s\nwant %s", err, tc.want)
			}
		})
	}
}

// TestSidecarAcceptsBOM guards the UTF-8 byte order mark some editors put
// at the start of a JSON file: accepted, as in CSV.
func TestSidecarAcceptsBOM(t *testing.T) {
	sc, err := ParseSidecar("s.json", []byte("\uFEFF{\"sampleRate\": 500, \"channels\": [\"A\"], \"trials\": 1, \"samples\": 2, \"start\": 0}"))
	if err != nil {
		t.Fatal(err)
	}
	if sc.SampleRate != 500 || len(sc.Channels) != 1 {
		t.Fatalf("sidecar %+v", sc)
	}
}

func TestMissingSibling(t *testing.T) {
	for _, tc := range []struct{ name, want string }{
		{"dir/x.f32", "f32: dir/x.f32: needs its sidecar x.json beside it: x.json: no such file"},
		{"x.json", "f32: x.json: needs its binary x.f32 beside it: x.f32: no such file"},
		{"X.F32", "f32: X.F32: needs its sidecar X.json beside it: X.json: no such file"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Decode(format.Bytes(tc.name, []byte(`{"sampleRate": 1}`)), nil)
			if err == nil || err.Error() != tc.want {
				t.Errorf("got  %v\nwant %s", err, tc.want)
			}
			if !errors.Is(err, format.ErrNoSibling) {
				t.Errorf("error does not wrap format.ErrNoSibling")
			}
		})
	}
}

// shortReader claims more bytes than it has.
type shortReader struct{ b []byte }

func (s shortReader) ReadAt(p []byte, off int64) (int, error) {
	if off >= int64(len(s.b)) {
		return 0, errEOF
	}
	n := copy(p, s.b[off:])
	if n < len(p) {
		return n, errEOF
	}
	return n, nil
}

var errEOF = errors.New("EOF")

func TestLimits(t *testing.T) {
	sc := &Sidecar{SampleRate: 10, Channels: []string{"A"}, Trials: 2, Samples: 3}
	t.Run("truncated", func(t *testing.T) {
		bin := format.File{Name: "t.f32", R: shortReader{make([]byte, 10)}, Size: 24}
		_, err := new(Reader).Read(bin, "t.json", sc)
		if err == nil || err.Error() != "f32: t.f32: offset 10: EOF" {
			t.Errorf("got %v", err)
		}
	})
	t.Run("max bytes", func(t *testing.T) {
		r := Reader{MaxBytes: 20}
		_, err := r.Read(format.Bytes("t.f32", make([]byte, 24)), "t.json", sc)
		if err == nil || err.Error() != "f32: t.f32: 24 bytes exceed the limit of 20 bytes: unsupported" || !errors.Is(err, format.ErrUnsupported) {
			t.Errorf("got %v", err)
		}
	})
	// The caller's sample budget (amplink run --max-memory) is the limit
	// when MaxBytes is 0.
	t.Run("sample budget", func(t *testing.T) {
		defer func(v int64) { data.MaxSampleBytes = v }(data.MaxSampleBytes)
		data.MaxSampleBytes = 20
		_, err := new(Reader).Read(format.Bytes("t.f32", make([]byte, 24)), "t.json", sc)
		if err == nil || err.Error() != "f32: t.f32: 24 bytes exceed the limit of 20 bytes: unsupported" {
			t.Errorf("got %v", err)
		}
	})
	t.Run("overflow", func(t *testing.T) {
		big := &Sidecar{SampleRate: 10, Channels: make([]string, 1<<12), Trials: 1<<31 - 1, Samples: 1<<31 - 1}
		_, err := new(Reader).Read(format.Bytes("t.f32", nil), "t.json", big)
		if err == nil || !errors.Is(err, format.ErrUnsupported) {
			t.Errorf("got %v", err)
		}
	})
}

func TestDetect(t *testing.T) {
	for _, tc := range []struct {
		head, name string
		want       bool
	}{
		{"\x00\x00\x80\x3f", "a.f32", true},
		{"\x00\x00\x80\x3f", "A.F32", true},
		{`{"sampleRate": 500}`, "a.json", true},
		{`{"SamplingFrequency": 500}`, "sub-01_eeg.json", false},
		{`{"sampleRate": 500}`, "a.txt", false},
	} {
		t.Run(tc.name+" "+tc.head, func(t *testing.T) {
			f, ok := format.Detect([]byte(tc.head), tc.name)
			if got := ok && f.Name == "f32"; got != tc.want {
				t.Errorf("detected as f32: %v, want %v", got, tc.want)
			}
		})
	}
}

func randomEpochs(seed uint64, trials, chans, samples int) *data.Epochs {
	rng := rand.New(rand.NewPCG(seed, 1))
	chs := make([]data.Channel, chans)
	for i := range chs {
		chs[i] = data.Channel{Name: fmt.Sprintf("E%d", i+1), Unit: "uV"}
	}
	e := data.NewEpochs(512, -0.25, chs, trials, samples)
	e.Name = "r.f32"
	for i := range e.Data {
		e.Data[i] = float32(rng.NormFloat64() * 20)
	}
	return e
}

func TestRoundTrip(t *testing.T) {
	for _, tc := range []struct {
		name                   string
		trials, chans, samples int
		types                  bool
	}{
		{"one value", 1, 1, 1, false},
		{"chunk boundary", 3, 7, chunkBytes/4/7 + 5, true},
		{"several chunks", 20, 4, 2000, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			e := randomEpochs(7, tc.trials, tc.chans, tc.samples)
			if tc.types {
				e.TrialInfo = make([]data.Event, tc.trials)
				for i := range e.TrialInfo {
					e.TrialInfo[i].Type = []string{"a", "b"}[i%2]
				}
			}
			var bin, side bytes.Buffer
			if err := Write(&bin, &side, e); err != nil {
				t.Fatal(err)
			}
			if want := 4 * len(e.Data); bin.Len() != want {
				t.Fatalf("binary has %d bytes, want %d", bin.Len(), want)
			}
			d, err := Decode(format.Bytes("r.json", side.Bytes()), mapSib{"r.f32": bin.Bytes()})
			if err != nil {
				t.Fatal(err)
			}
			g := d.Epochs
			if g.Rate != e.Rate || g.Start != e.Start || g.NTrials != e.NTrials || g.NSamples != e.NSamples ||
				fmt.Sprint(g.Channels) != fmt.Sprint(e.Channels) {
				t.Fatalf("header differs: %+v", g)
			}
			for i := range e.Data {
				if math.Float32bits(g.Data[i]) != math.Float32bits(e.Data[i]) {
					t.Fatalf("value %d: %v != %v", i, g.Data[i], e.Data[i])
				}
			}
			if tc.types != (g.TrialInfo != nil) || (tc.types && g.TrialInfo[1].Type != "b") {
				t.Errorf("trial info %v", g.TrialInfo)
			}
		})
	}
}

// TestWriteGolden checks the sidecar text; a mismatch writes a .got file.
func TestWriteGolden(t *testing.T) {
	e := randomEpochs(1, 2, 3, 4)
	e.TrialInfo = []data.Event{{Type: "tone"}, {Type: "noise"}}
	var bin, side bytes.Buffer
	if err := Write(&bin, &side, e); err != nil {
		t.Fatal(err)
	}
	golden := filepath.Join(dir, "write.golden.json")
	want, err := os.ReadFile(golden)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(side.Bytes(), want) {
		os.WriteFile(strings.TrimSuffix(golden, ".json")+".got", side.Bytes(), 0o644)
		t.Errorf("sidecar differs from %s; see the .got file", golden)
	}
	// The written pair must also decode with the reader.
	if _, err := Decode(format.Bytes("r.f32", bin.Bytes()), mapSib{"r.json": side.Bytes()}); err != nil {
		t.Error(err)
	}
}

func TestWriteErrors(t *testing.T) {
	for _, tc := range []struct {
		name string
		edit func(e *data.Epochs)
		want string
	}{
		{"nan", func(e *data.Epochs) { e.Trial(1, 2)[3] = float32(math.NaN()) }, "f32: r.f32: trial 2, channel E3, sample 4 is NaN"},
		{"inf", func(e *data.Epochs) { e.Data[0] = float32(math.Inf(1)) }, "f32: r.f32: trial 1, channel E1, sample 1 is +Inf"},
		{"units", func(e *data.Epochs) { e.Channels[1].Unit = "fT" }, `f32: r.f32: channels E1 ("uV") and E2 ("fT") have different units; the sidecar holds one`},
		{"duplicate", func(e *data.Epochs) { e.Channels[2].Name = "E1" }, `f32: r.f32: channel name "E1" appears twice`},
		{"no name", func(e *data.Epochs) { e.Channels[0].Name = "" }, "f32: r.f32: channel 1 has no name"},
		{"rate", func(e *data.Epochs) { e.Rate = 0 }, "f32: r.f32: data: sample rate 0 is not positive"},
		{"start", func(e *data.Epochs) { e.Start = math.NaN() }, "f32: r.f32: start NaN is not a finite time"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			e := randomEpochs(3, 2, 3, 4)
			e.Channels = append([]data.Channel(nil), e.Channels...)
			tc.edit(e)
			var bin, side bytes.Buffer
			err := Write(&bin, &side, e)
			if err == nil || err.Error() != tc.want {
				t.Errorf("got  %v\nwant %s", err, tc.want)
			}
			if bin.Len()+side.Len() != 0 {
				t.Errorf("wrote %d bytes before failing", bin.Len()+side.Len())
			}
		})
	}
}
