package edf

import (
	"bytes"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"testing"

	"amplink/core/data"
	"amplink/core/format"
)

// sameAsDecode checks that Open gives what Decode gives on b: the same
// error, or the same channels, events, notes and length, with samples read
// through the Source equal to the decoded ones over random spans (record
// boundaries crossed or not) and over the whole recording.
func sameAsDecode(t *testing.T, name string, b []byte, spans int) {
	t.Helper()
	want, wh, werr := Decode(format.Bytes(name, b))
	got, gh, gerr := Open(format.Bytes(name, b))
	if (werr == nil) != (gerr == nil) || werr != nil && werr.Error() != gerr.Error() {
		t.Fatalf("Open: %v; Decode: %v", gerr, werr)
	}
	if werr != nil {
		return
	}
	if !got.Streamed() || got.Len() != want.Len() || got.Rate != want.Rate ||
		!slices.Equal(got.Channels, want.Channels) || !slices.Equal(got.Notes, want.Notes) ||
		!equalEvents(got.Events, want.Events, 0) || gh.StartOffset != wh.StartOffset {
		t.Fatalf("Open: %d samples, %v, %v, %v; Decode: %d, %v, %v, %v", got.Len(), got.Channels, got.Events, got.Notes, want.Len(), want.Channels, want.Events, want.Notes)
	}
	n, nc := want.Len(), len(want.Channels)
	rng := rand.New(rand.NewPCG(uint64(len(b)), 3))
	for k := 0; k <= spans; k++ {
		lo, hi := 0, n // the whole recording first
		if k > 0 {
			lo = rng.IntN(n)
			hi = lo + 1 + rng.IntN(n-lo)
		}
		chans := []int{rng.IntN(nc), rng.IntN(nc)}
		dst := [][]float32{make([]float32, hi-lo), make([]float32, hi-lo)}
		if err := got.Block(dst, chans, lo); err != nil {
			t.Fatalf("Block [%d, %d): %v", lo, hi, err)
		}
		for i, c := range chans {
			if !slices.Equal(dst[i], want.Samples[c][lo:hi]) {
				t.Fatalf("channel %d, samples [%d, %d): streamed samples differ from decoded ones", c, lo, hi)
			}
		}
	}
}

// TestOpenMatchesDecode: every file of testdata/edf, valid or not.
func TestOpenMatchesDecode(t *testing.T) {
	paths, err := filepath.Glob(filepath.Join(dir, "*.[eb]df"))
	if err != nil || len(paths) < 20 {
		t.Fatalf("found %d files: %v", len(paths), err)
	}
	for _, p := range paths {
		t.Run(filepath.Base(p), func(t *testing.T) {
			b, err := os.ReadFile(p)
			if err != nil {
				t.Fatal(err)
			}
			sameAsDecode(t, filepath.Base(p), b, 50)
		})
	}
	t.Run("written BDF", func(t *testing.T) { sameAsDecode(t, "w.bdf", writeFixture(t, true), 50) })
	t.Run("written EDF", func(t *testing.T) { sameAsDecode(t, "w.edf", writeFixture(t, false), 50) })
}

// TestOpenHoldsNoSamples: Open does not allocate the samples, so a sample
// budget below the recording refuses Decode and not Open.
func TestOpenHoldsNoSamples(t *testing.T) {
	b := writeFixture(t, false)
	defer func(v int64) { data.MaxSampleBytes = v }(data.MaxSampleBytes)
	data.MaxSampleBytes = 4
	if _, _, err := Decode(format.Bytes("w.edf", b)); err == nil {
		t.Fatal("Decode under a 4-byte budget succeeded")
	}
	rec, _, err := Open(format.Bytes("w.edf", b))
	if err != nil || rec.Samples != nil {
		t.Fatalf("Open under a 4-byte budget: %v (samples held: %v)", err, rec != nil && rec.Samples != nil)
	}
	// the registry streams EDF through format.Open, and decodes it whole through format.Decode
	d, err := format.Open(format.Bytes("w.edf", b), nil)
	if err != nil || !d.Recording.Streamed() {
		t.Fatalf("format.Open: %v", err)
	}
}

// TestStreamReadError: a file that fails to read after Open gives an
// error naming the file and the record, not a panic.
func TestStreamReadError(t *testing.T) {
	b := writeFixture(t, false)
	fr := &failAfter{b: b}
	rec, _, err := Open(format.File{Name: "w.edf", R: fr, Size: int64(len(b))})
	if err != nil {
		t.Fatal(err)
	}
	fr.fail = true
	dst := [][]float32{make([]float32, rec.Len())}
	err = rec.Block(dst, []int{0}, 0)
	if err == nil || !bytes.Contains([]byte(err.Error()), []byte("w.edf")) || !bytes.Contains([]byte(err.Error()), []byte("data record 1")) {
		t.Fatalf("read error: %v, want one naming w.edf and data record 1", err)
	}
}

type failAfter struct {
	b    []byte
	fail bool
}

func (f *failAfter) ReadAt(p []byte, off int64) (int, error) {
	if f.fail {
		return 0, os.ErrClosed
	}
	return bytes.NewReader(f.b).ReadAt(p, off)
}

// FuzzOpen: on any bytes, Open fails exactly where Decode fails, with the
// same message, and its streamed samples are Decode's.
func FuzzOpen(f *testing.F) {
	paths, _ := filepath.Glob(filepath.Join(dir, "*.[eb]df"))
	for _, p := range paths {
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) > 1<<20 {
			return
		}
		sameAsDecode(t, "fuzz.edf", b, 3)
	})
}
