package mp3

import (
	"errors"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"

	"amplink/core/data"
	"amplink/core/format"
)

const dir = "../../../testdata/mp3"

func readFile(t testing.TB, name string) format.File {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, name))
	if err != nil {
		t.Fatal(err)
	}
	return format.Bytes(name, b)
}

// peak returns the frequency in Hz of the largest non-DC FFT bin of x.
func peak(x []float32, rate float64) float64 {
	seq := make([]float64, len(x))
	for i, v := range x {
		seq[i] = float64(v)
	}
	coef := fourier.NewFFT(len(seq)).Coefficients(nil, seq)
	best := 1
	for i := 1; i < len(coef); i++ {
		if cmplx.Abs(coef[i]) > cmplx.Abs(coef[best]) {
			best = i
		}
	}
	return float64(best) * rate / float64(len(seq))
}

// TestSines decodes the LAME-encoded sines of testdata/mp3 (SOURCE.txt):
// channel count, rate, duration and the frequency of each channel.
func TestSines(t *testing.T) {
	for _, tc := range []struct {
		file  string
		rate  float64
		freqs []float64 // per channel, as given to sox synth in make.sh
		exact bool      // gapless tag present: exactly 0.5 s
		notes int
	}{
		{"mono.mp3", 44100, []float64{1000}, true, 2},
		{"stereo-id3.mp3", 44100, []float64{440, 1000}, true, 2},
		{"mpeg2-mono.mp3", 22050, []float64{700}, false, 2},
		{"notag.mp3", 44100, []float64{1000}, false, 2},
	} {
		t.Run(tc.file, func(t *testing.T) {
			d, err := format.Decode(readFile(t, tc.file), nil)
			if err != nil {
				t.Fatal(err)
			}
			r := d.Recording
			if r.Format != "mp3" || r.Rate != tc.rate || len(r.Samples) != len(tc.freqs) || len(r.Channels) != len(tc.freqs) {
				t.Fatalf("format %s, %g Hz, %d channels; want mp3, %g Hz, %d", r.Format, r.Rate, len(r.Samples), tc.rate, len(tc.freqs))
			}
			// The source is 0.5 s (make.sh). With the gapless tag the length
			// is exact. Without it, the output is longer by LAME's encoder
			// delay of 576 samples (from memory; the Info frames of the
			// tagged files say the same) plus padding to whole frames: less
			// than two frames.
			frame := 1152.0
			if r.Rate < 32000 {
				frame = 576 // MPEG-2
			}
			n, src := float64(r.Len()), 0.5*tc.rate
			if tc.exact && n != src {
				t.Errorf("%v samples, want exactly %v", n, src)
			}
			if extra := n - src - 576; !tc.exact && (extra < 0 || extra >= 2*frame) {
				t.Errorf("%v samples; want %v + 576 + less than two frames of %v", n, src, frame)
			}
			for c, want := range tc.freqs {
				if got := peak(r.Samples[c], r.Rate); math.Abs(got-want) > r.Rate/n {
					t.Errorf("channel %d peaks at %.1f Hz, want %g (FFT, gonum dsp/fourier)", c+1, got, want)
				}
				if ch := r.Channels[c]; ch != (data.Channel{Name: "ch" + strconv.Itoa(c+1), Type: "AUDIO", Unit: "a.u."}) {
					t.Errorf("channel %+v", ch)
				}
			}
			if len(r.Notes) != tc.notes || r.Notes[0] != GainNote {
				t.Errorf("notes %q", r.Notes)
			}
			var maxAbs float32
			for _, s := range r.Samples {
				for _, v := range s {
					maxAbs = max(maxAbs, v, -v)
				}
			}
			if maxAbs > 1 || maxAbs < 0.3 {
				t.Errorf("peak amplitude %v, want a full-scale sine within [-1, 1)", maxAbs)
			}
		})
	}
}

// TestOnset checks that delay removal puts the tone where sox put it.
func TestOnset(t *testing.T) {
	d, err := Decode(readFile(t, "onset.mp3"), nil)
	if err != nil {
		t.Fatal(err)
	}
	r := d.Recording
	b, err := os.ReadFile(filepath.Join(dir, "onset.samples"))
	if err != nil {
		t.Fatal(err)
	}
	want, _ := strconv.Atoi(strings.TrimSpace(string(b))) // soxi -s of the source (make.sh)
	if r.Len() != want {
		t.Errorf("%d samples, the source had %d", r.Len(), want)
	}
	// sox synth ... pad 0.2: the sine starts at sample 0.2·44100 = 8820 with
	// sin(0) = 0, so sample 8821 is the first one clearly above zero.
	first := -1
	for i, v := range r.Samples[0] {
		if math.Abs(float64(v)) > 0.01 {
			first = i
			break
		}
	}
	if first < 8821-8 || first > 8821+8 {
		t.Errorf("tone starts at sample %d, want 8821 (±8 for pre-echo)", first)
	}
	wantNote := "removed 2257 leading samples (Info frame 1152, encoder delay 576, decoder delay 529) and 281 trailing (padding 810 less the decoder delay)"
	if len(r.Notes) != 2 || r.Notes[1] != wantNote {
		t.Errorf("notes %q", r.Notes)
	}
}

func TestCut(t *testing.T) {
	d, err := Decode(readFile(t, "cut.mp3"), nil)
	if err != nil {
		t.Fatal(err)
	}
	r := d.Recording
	want := []string{GainNote,
		"decoded 10368 of the 11520 samples the frame headers announce",
		"the Info frame announces 21 audio frames, 8 decoded: the file is cut short",
		"removed 2257 leading samples (Info frame 1152, encoder delay 576, decoder delay 529) and 0 trailing (padding 1566 less the decoder delay)",
	}
	if strings.Join(r.Notes, "\n") != strings.Join(want, "\n") {
		t.Errorf("notes\n%s\nwant\n%s", strings.Join(r.Notes, "\n"), strings.Join(want, "\n"))
	}
	if r.Len() != 10368-2257 {
		t.Errorf("%d samples, want %d", r.Len(), 10368-2257)
	}
	// The part that is there matches the whole file.
	full, err := Decode(readFile(t, "mono.mp3"), nil)
	if err != nil {
		t.Fatal(err)
	}
	for k := range 4096 {
		if r.Samples[0][k] != full.Recording.Samples[0][k] {
			t.Fatalf("sample %d differs from mono.mp3", k)
		}
	}
}

// junkFrame is an MPEG-1 Layer III frame header (FF FB 90 64) followed by
// 600 bytes of i·37 mod 256.
func junkFrame() []byte {
	b := []byte{0xff, 0xfb, 0x90, 0x64}
	for i := range 600 {
		b = append(b, byte(i*37))
	}
	return b
}

func TestInvalid(t *testing.T) {
	for _, tc := range []struct {
		name     string
		b        []byte
		want     string
		sentinel error
	}{
		{"invalid-mpeg25.mp3", nil, "mp3: invalid-mpeg25.mp3: offset 0 (frame header): MPEG-2.5 audio is not supported (MPEG-1 and MPEG-2 Layer III): unsupported", format.ErrUnsupported},
		{"invalid-noframe.mp3", nil, "mp3: invalid-noframe.mp3: offset 26 (frame header): no MPEG-1/2 Layer III frame header in the 25 bytes from here", nil},
		{"header only", []byte("\xff\xfb\x50\xc4"), "mp3: header only: offset 0: decoding: the first frame is cut short: file is truncated", format.ErrTruncated},
		{"id3 too long", []byte("ID3\x03\x00\x00\x00\x00\x10\x00abc"), "mp3: id3 too long: offset 13 (ID3 tag): tag of 2058 bytes runs past the end of the file: file is truncated", format.ErrTruncated},
		// A frame header followed by junk: go-mp3 fails inside the frame; the
		// error gives the offset the decoder had read to.
		// mpeg2-mono.mp3 with bytes overwritten at random (PCG 3, 4): go-mp3
		// indexes a table out of range; recovered, with the offset reached.
		{"invalid-decoder-panic.mp3", nil, "mp3: invalid-decoder-panic.mp3: offset 1358: the decoder failed on malformed data before this offset (runtime error: index out of range [38] with length 38): syntax error", format.ErrSyntax},
		{"decoder failure has an offset", junkFrame(), "mp3: decoder failure has an offset: offset 417: decoding, before this offset: mp3: is_pos was too big: 576", nil},
		{"id3 not syncsafe", []byte("ID3\x03\x00\x00\x00\x80\x10\x00abc"), "mp3: id3 not syncsafe: offset 6 (ID3 tag size): size bytes 00 80 10 00 are not syncsafe", nil},
	} {
		t.Run(tc.name, func(t *testing.T) {
			f := format.Bytes(tc.name, tc.b)
			if tc.b == nil {
				f = readFile(t, tc.name)
			}
			_, err := Decode(f, nil)
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

func TestMaxBytes(t *testing.T) {
	r := Reader{MaxBytes: 10000}
	_, err := r.Read(readFile(t, "mono.mp3"))
	want := "mp3: mono.mp3: offset 0: 25344 samples × 1 channels need 101376 bytes, more than the limit of 10000: unsupported"
	if err == nil || err.Error() != want {
		t.Errorf("got  %v\nwant %s", err, want)
	}
}

func TestMatch(t *testing.T) {
	for _, tc := range []struct {
		name, head string
		want       bool
	}{
		{"id3", "ID3\x04\x00", true},
		{"mpeg1 layer3 mono", "\xff\xfb\x50\xc4", true},
		{"mpeg2 layer3", "\xff\xf3\x40\xc4", true},
		{"mpeg2.5", "\xff\xe3\x18\xc4", false},
		{"layer2", "\xff\xfd\x50\xc4", false},
		{"free bitrate", "\xff\xfb\x00\xc4", false},
		{"bad rate", "\xff\xfb\x5c\xc4", false},
		{"bdf", "\xffBIOSEMI", false},
		{"short", "\xff\xfb", false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if got := Match([]byte(tc.head), "x"); got != tc.want {
				t.Errorf("Match = %v, want %v", got, tc.want)
			}
			if ft, ok := format.Detect([]byte(tc.head), "x.bin"); tc.want && (!ok || ft.Name != "mp3") {
				t.Errorf("Detect gave %q", ft.Name)
			}
		})
	}
}

// TestInfoWithoutLAME blanks the encoder name of mono.mp3's LAME tag: only
// the Info frame's silence can then be removed.
func TestInfoWithoutLAME(t *testing.T) {
	f := readFile(t, "mono.mp3")
	b := make([]byte, f.Size)
	f.R.ReadAt(b, 0)
	i := strings.Index(string(b[:1000]), "LAME")
	if i < 0 {
		t.Fatal("mono.mp3 has no LAME tag")
	}
	copy(b[i:], "XXXX")
	d, err := Decode(format.Bytes("x.mp3", b), nil)
	if err != nil {
		t.Fatal(err)
	}
	r := d.Recording
	want := "removed the 1152 silent samples of the Info frame; no encoder-delay tag: samples start late by the encoder delay plus the decoder's 529"
	if len(r.Notes) != 2 || r.Notes[1] != want {
		t.Errorf("notes %q", r.Notes)
	}
	// 22 frames of 1152 decoded (TestCut's mono.mp3), less the Info frame.
	if r.Len() != 21*1152 {
		t.Errorf("%d samples, want %d", r.Len(), 21*1152)
	}
}
