package wav

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"amplink/core/data"
	"amplink/core/format"
)

const dir = "../../../testdata/wav"

func readFile(t testing.TB, name string) format.File {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, name))
	if err != nil {
		t.Fatal(err)
	}
	return format.Bytes(name, b)
}

// sox is what `sox FILE -t dat -` prints: the rate, the channel count and
// one row per sample frame (time, then one value per channel).
type sox struct {
	rate  float64
	chans int
	rows  [][]float64
}

func readDat(t *testing.T, name string) sox {
	t.Helper()
	f, err := os.Open(filepath.Join(dir, name))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var s sox
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		if v, ok := strings.CutPrefix(line, "; Sample Rate "); ok {
			s.rate, _ = strconv.ParseFloat(v, 64)
			continue
		}
		if v, ok := strings.CutPrefix(line, "; Channels "); ok {
			s.chans, _ = strconv.Atoi(v)
			continue
		}
		var row []float64
		for _, w := range strings.Fields(line) {
			v, err := strconv.ParseFloat(w, 64)
			if err != nil {
				t.Fatalf("%s: %q: %v", name, line, err)
			}
			row = append(row, v)
		}
		s.rows = append(s.rows, row)
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return s
}

// TestSoxReference compares every sample with SoX's own decoding.
func TestSoxReference(t *testing.T) {
	// Reference: SoX 14.4.2 `sox FILE -t dat -` (testdata/wav/make.sh), which
	// also scales integers by 2^(bits-1). sox prints 11 significant digits;
	// 32-bit integers and float64 lose precision in float32 storage.
	for _, tc := range []struct {
		file, dat string
		tol       float64
		notes     int
	}{
		{"pcm16-stereo.wav", "pcm16-stereo.dat", 1e-10, 1},
		{"pcm8-mono.wav", "pcm8-mono.dat", 1e-10, 1},
		{"pcm24-ext.wav", "pcm24-ext.dat", 1e-10, 1},
		{"pcm32-ext.wav", "pcm32-ext.dat", 6e-8, 1},
		{"pcm16-3ch.wav", "pcm16-3ch.dat", 1e-10, 1},
		{"float32.wav", "float32.dat", 1e-10, 1},
		{"float64.wav", "float64.dat", 6e-8, 1},
		{"oddchunk.wav", "oddchunk.dat", 1e-10, 1},
		{"piped.wav", "piped.dat", 1e-10, 2},
		// SoX 14.4.2 refuses fmt after data; patch.py moved the chunks of
		// pcm16-stereo.wav, so its values must match.
		{"fmtlast.wav", "pcm16-stereo.dat", 1e-10, 1},
	} {
		t.Run(tc.file, func(t *testing.T) {
			d, err := format.Decode(readFile(t, tc.file), nil)
			if err != nil {
				t.Fatal(err)
			}
			rec := d.Recording
			ref := readDat(t, tc.dat)
			if rec.Format != "wav" || rec.Rate != ref.rate || len(rec.Samples) != ref.chans || rec.Len() != len(ref.rows) {
				t.Fatalf("format %s, %g Hz, %d channels, %d frames; sox: %g Hz, %d channels, %d frames",
					rec.Format, rec.Rate, len(rec.Samples), rec.Len(), ref.rate, ref.chans, len(ref.rows))
			}
			worst := 0.0
			for k, row := range ref.rows {
				if dt := math.Abs(row[0] - float64(k)/rec.Rate); dt > 1e-9 {
					t.Fatalf("frame %d: sox time %v", k, row[0])
				}
				for c := range ref.chans {
					worst = max(worst, math.Abs(float64(rec.Samples[c][k])-row[c+1]))
				}
			}
			if worst > tc.tol {
				t.Errorf("largest difference from sox %g > %g", worst, tc.tol)
			}
			if len(rec.Notes) != tc.notes || rec.Notes[0] != GainNote {
				t.Errorf("notes %q", rec.Notes)
			}
			for c, ch := range rec.Channels {
				if want := (data.Channel{Name: fmt.Sprintf("ch%d", c+1), Type: "AUDIO", Unit: "a.u."}); ch != want {
					t.Errorf("channel %d = %+v", c, ch)
				}
			}
		})
	}
}

func TestNotes(t *testing.T) {
	d, err := Decode(readFile(t, "piped.wav"), nil)
	if err != nil {
		t.Fatal(err)
	}
	// SoX writing to a pipe leaves the data size at 0x7ffff000 (make.sh).
	want := "data chunk declares 2147479552 bytes, the file holds 320 after offset 44; read what is there (writers that stream cannot fix the size)"
	if got := d.Recording.Notes[1]; got != want {
		t.Errorf("got  %s\nwant %s", got, want)
	}
	// A trailing partial frame is dropped with a note.
	b, _ := os.ReadFile(filepath.Join(dir, "pcm16-stereo.wav"))
	b = append(b[:len(b):len(b)], 1, 2, 3)
	binaryPut32(b[40:], 1600+3)
	d, err = Decode(format.Bytes("x.wav", b), nil)
	if err != nil {
		t.Fatal(err)
	}
	if got := d.Recording.Notes; len(got) != 2 || got[1] != "dropped 3 trailing data bytes that make no whole sample frame" || d.Recording.Len() != 400 {
		t.Errorf("notes %q, %d frames", got, d.Recording.Len())
	}
}

func binaryPut32(b []byte, v uint32) {
	b[0], b[1], b[2], b[3] = byte(v), byte(v>>8), byte(v>>16), byte(v>>24)
}

// TestInvalid reads the broken copies that testdata/wav/patch.py derives
// from SoX's files (invalid-adpcm.wav is SoX's own MS ADPCM output).
func TestInvalid(t *testing.T) {
	for _, tc := range []struct {
		file     string
		want     string
		sentinel error
	}{
		{"invalid-nofmt.wav", "wav: invalid-nofmt.wav: offset 1620 (fmt chunk): no fmt chunk before the end of the file", nil},
		{"invalid-nodata.wav", "wav: invalid-nodata.wav: offset 50 (data chunk): no data chunk before the end of the file", nil},
		{"invalid-adpcm.wav", "wav: invalid-adpcm.wav: offset 20 (format tag): format tag 0x0002 (Microsoft ADPCM) is not supported (PCM or IEEE float, plain or extensible): unsupported", format.ErrUnsupported},
		{"invalid-extguid.wav", "wav: invalid-extguid.wav: offset 44 (subformat): extensible subformat 0x0002 (Microsoft ADPCM) is not supported (PCM or IEEE float): unsupported", format.ErrUnsupported},
		{"invalid-blockalign.wav", "wav: invalid-blockalign.wav: offset 32 (block align): block align 6 does not match 2 channels × 16 bits = 4 bytes", nil},
		{"invalid-zerochannels.wav", "wav: invalid-zerochannels.wav: offset 22 (channels): no channels", nil},
		{"invalid-rate.wav", "wav: invalid-rate.wav: offset 24 (sample rate): sample rate is 0 Hz", nil},
		{"invalid-truncated.wav", "wav: invalid-truncated.wav: offset 30 (fmt chunk): file is truncated", format.ErrTruncated},
		{"invalid-cutdata.wav", "wav: invalid-cutdata.wav: offset 47 (data chunk): 3 data bytes present, one sample frame needs 4: file is truncated", format.ErrTruncated},
		{"invalid-nan.wav", "wav: invalid-nan.wav: offset 86 (data chunk): sample 8 of channel ch1 is NaN", nil},
	} {
		t.Run(tc.file, func(t *testing.T) {
			_, err := format.Decode(readFile(t, tc.file), nil)
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

// TestHeaderErrors edits the header of pcm16-stereo.wav in memory.
func TestHeaderErrors(t *testing.T) {
	orig := readFile(t, "pcm16-stereo.wav")
	b := make([]byte, orig.Size)
	orig.R.ReadAt(b, 0)
	for _, tc := range []struct {
		name string
		edit func(b []byte) []byte
		want string
	}{
		{"rifx", func(b []byte) []byte { b[3] = 'X'; return b },
			`wav: x.wav: offset 0 (RIFF header): not a RIFF/WAVE file (starts "RIFXd\x06\x00\x00WAVE")`},
		{"short", func(b []byte) []byte { return b[:8] }, "wav: x.wav: offset 8 (RIFF header): file is truncated"},
		{"257 channels", func(b []byte) []byte { b[22], b[23] = 1, 1; return b },
			"wav: x.wav: offset 22 (channels): 257 channels, more than 256: unsupported"},
		// A 512-byte file claiming 2^32−1 Hz would need wavelets of gigabytes.
		{"rate 2^32-1 Hz", func(b []byte) []byte { binaryPut32(b[24:], 4294967295); return b },
			"wav: x.wav: offset 24 (sample rate): sample rate 4.29497e+09 Hz is above the limit of 1 MHz; no EEG, MEG, LFP or sound-card recording is sampled that fast (amplifiers sample at up to tens of kHz, sound cards at up to 768 kHz), so the header or time axis is wrong: impossible sample rate"},
		{"12 bits", func(b []byte) []byte { b[34] = 12; return b },
			"wav: x.wav: offset 34 (bits per sample): 12-bit PCM samples are not supported (PCM 8, 16, 24, 32; float 32, 64): unsupported"},
		{"fmt size 14", func(b []byte) []byte { b[16] = 14; return b },
			"wav: x.wav: offset 16 (fmt chunk size): fmt chunk has 14 bytes, needs at least 16"},
		{"empty data", func(b []byte) []byte { binaryPut32(b[40:], 0); return b[:44] },
			"wav: x.wav: offset 40 (data chunk size): data chunk holds no whole sample frame (0 bytes, 4 per frame)"},
		{"chunk past end", func(b []byte) []byte { return append(b[:12:12], "LIST\xff\x00\x00\x00abc"...) },
			"wav: x.wav: offset 23 (LIST chunk): chunk at offset 12 declares 255 bytes, the file ends first: file is truncated"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c := tc.edit(bytes.Clone(b))
			_, err := Decode(format.Bytes("x.wav", c), nil)
			if err == nil || err.Error() != tc.want {
				t.Errorf("got  %v\nwant %s", err, tc.want)
			}
		})
	}
}

func TestMaxBytes(t *testing.T) {
	r := Reader{MaxBytes: 1000}
	_, err := r.Read(readFile(t, "pcm16-stereo.wav"))
	want := "wav: pcm16-stereo.wav: offset 44 (data chunk): 400 frames × 2 channels need 3200 bytes, more than the limit of 1000: unsupported"
	if err == nil || err.Error() != want {
		t.Errorf("got  %v\nwant %s", err, want)
	}
}

// TestWriteMatchesSox decodes SoX's files and writes them again: the bytes
// must be identical to SoX's (make.sh), header and data.
func TestWriteMatchesSox(t *testing.T) {
	for _, tc := range []struct {
		file string
		enc  Encoding
	}{
		{"pcm16-stereo.wav", PCM16},
		{"pcm16-3ch.wav", PCM16},
		{"float32.wav", Float32},
	} {
		t.Run(tc.file, func(t *testing.T) {
			f := readFile(t, tc.file)
			want := make([]byte, f.Size)
			f.R.ReadAt(want, 0)
			d, err := Decode(f, nil)
			if err != nil {
				t.Fatal(err)
			}
			var got bytes.Buffer
			if err := Write(&got, d.Recording, Options{Encoding: tc.enc}); err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(got.Bytes(), want) {
				n := 0
				for n < min(got.Len(), len(want)) && got.Bytes()[n] == want[n] {
					n++
				}
				t.Errorf("%d bytes differ from SoX's %d from offset %d", got.Len(), len(want), n)
			}
		})
	}
}

func randomRecording(seed uint64, chans, n int, scale float64) *data.Recording {
	rng := rand.New(rand.NewPCG(seed, 2))
	r := &data.Recording{Name: "r.wav", Rate: 1000, Samples: make([][]float32, chans)}
	for c := range r.Samples {
		r.Samples[c] = make([]float32, n)
		for k := range r.Samples[c] {
			r.Samples[c][k] = float32(math.Max(-1, math.Min(1, rng.NormFloat64()*scale)))
		}
	}
	return r
}

func TestRoundTrip(t *testing.T) {
	for _, tc := range []struct {
		name     string
		chans, n int
		enc      Encoding
		tol      float64
	}{
		{"float mono", 1, 1, Float32, 0},
		{"float 64 channels", 64, 1000, Float32, 0},
		{"float 256 channels", 256, 300, Float32, 0},
		{"pcm16 stereo", 2, 40000, PCM16, 0.5 / 32768},
		{"pcm16 5 channels", 5, 999, PCM16, 0.5 / 32768},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r := randomRecording(5, tc.chans, tc.n, 0.4)
			r.Samples[0][0], r.Samples[0][len(r.Samples[0])-1] = 1, -1
			var buf bytes.Buffer
			if err := Write(&buf, r, Options{Encoding: tc.enc}); err != nil {
				t.Fatal(err)
			}
			d, err := Decode(format.Bytes("r.wav", buf.Bytes()), nil)
			if err != nil {
				t.Fatal(err)
			}
			g := d.Recording
			if g.Rate != r.Rate || len(g.Samples) != tc.chans || g.Len() != tc.n {
				t.Fatalf("%g Hz, %d channels, %d frames", g.Rate, len(g.Samples), g.Len())
			}
			for c := range r.Samples {
				for k, v := range r.Samples[c] {
					want := float64(v)
					if tc.enc == PCM16 && v == 1 {
						want = 32767.0 / 32768 // full scale is [-1, 1)
					}
					if d := math.Abs(float64(g.Samples[c][k]) - want); d > tc.tol {
						t.Fatalf("channel %d sample %d: %v, wrote %v", c, k, g.Samples[c][k], v)
					}
				}
			}
		})
	}
}

func TestWriteErrors(t *testing.T) {
	for _, tc := range []struct {
		name string
		edit func(r *data.Recording)
		enc  Encoding
		want string
	}{
		{"nan", func(r *data.Recording) { r.Samples[1][2] = float32(math.NaN()) }, Float32, "wav: r.wav: sample 3 of channel 2 is NaN"},
		{"range", func(r *data.Recording) { r.Samples[0][4] = 1.5 }, PCM16,
			"wav: r.wav: sample 5 of channel 1 is 1.5; PCM16 holds [-1, 1]: scale the data or write Float32"},
		{"ragged", func(r *data.Recording) { r.Samples[1] = r.Samples[1][:3] }, Float32, "wav: r.wav: channel 2 has 3 samples, channel 1 has 10"},
		{"rate", func(r *data.Recording) { r.Rate = 499.5 }, Float32, "wav: r.wav: sample rate 499.5 Hz is not a whole number from 1 to 4294967295"},
		{"no channels", func(r *data.Recording) { r.Samples = nil }, Float32, "wav: r.wav: 0 channels; WAV holds 1 to 256"},
		{"no samples", func(r *data.Recording) { r.Samples[0], r.Samples[1] = nil, nil }, PCM16, "wav: r.wav: no samples"},
		{"descriptions", func(r *data.Recording) { r.Channels = make([]data.Channel, 3) }, Float32, "wav: r.wav: 3 channel descriptions for 2 channels of samples"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r := randomRecording(1, 2, 10, 0.1)
			tc.edit(r)
			var buf bytes.Buffer
			err := Write(&buf, r, Options{Encoding: tc.enc})
			if err == nil || err.Error() != tc.want {
				t.Errorf("got  %v\nwant %s", err, tc.want)
			}
			if buf.Len() != 0 {
				t.Errorf("wrote %d bytes before failing", buf.Len())
			}
		})
	}
}

func TestDetect(t *testing.T) {
	f := readFile(t, "pcm24-ext.wav")
	head := make([]byte, 64)
	f.R.ReadAt(head, 0)
	for _, name := range []string{"pcm24-ext.wav", "recording.bin"} {
		if ft, ok := format.Detect(head, name); !ok || ft.Name != "wav" {
			t.Errorf("%s detected as %q", name, ft.Name)
		}
	}
	if ft, ok := format.Detect([]byte("RIFF\x00\x00\x00\x00AVI "), "x.avi"); ok && ft.Name == "wav" {
		t.Error("RIFF AVI detected as wav")
	}
}

// TestBadFloats puts NaN and an out-of-range float64 into the second channel.
func TestBadFloats(t *testing.T) {
	r := randomRecording(2, 2, 10, 0.1)
	var buf bytes.Buffer
	if err := Write(&buf, r, Options{}); err != nil {
		t.Fatal(err)
	}
	b := buf.Bytes()
	// 58 header bytes; frame 2 (from 0), channel 2 is float 5.
	binaryPut32(b[58+4*5:], 0x7fc00000)
	_, err := Decode(format.Bytes("n.wav", b), nil)
	if want := "wav: n.wav: offset 78 (data chunk): sample 3 of channel ch2 is NaN"; err == nil || err.Error() != want {
		t.Errorf("got  %v\nwant %s", err, want)
	}

	f := readFile(t, "float64.wav")
	h, err := ReadHeader(f)
	if err != nil {
		t.Fatal(err)
	}
	b = make([]byte, f.Size)
	f.R.ReadAt(b, 0)
	at := h.DataOffset + 8 // frame 1, channel 2
	binaryPut32(b[at:], uint32(math.Float64bits(1e300)))
	binaryPut32(b[at+4:], uint32(math.Float64bits(1e300)>>32))
	_, err = Decode(format.Bytes("d.wav", b), nil)
	if want := fmt.Sprintf("wav: d.wav: offset %d (data chunk): sample 1 of channel ch2 is 1e+300, beyond the float32 range", at); err == nil || err.Error() != want {
		t.Errorf("got  %v\nwant %s", err, want)
	}
}
