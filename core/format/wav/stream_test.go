package wav

import (
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"testing"

	"amplink/core/data"
	"amplink/core/format"
)

// sameAsRead: Open fails where Read fails, with the same message, or gives
// Read's channels, notes and length, with the samples read through the
// Source equal to Read's over the whole file and over random spans.
func sameAsRead(t *testing.T, name string, b []byte, spans int) {
	t.Helper()
	var r Reader
	want, werr := r.Read(format.Bytes(name, b))
	got, gerr := Open(format.Bytes(name, b))
	if (werr == nil) != (gerr == nil) || werr != nil && werr.Error() != gerr.Error() {
		t.Fatalf("Open: %v; Read: %v", gerr, werr)
	}
	if werr != nil {
		return
	}
	if !got.Streamed() || got.Len() != want.Len() || got.Rate != want.Rate || !slices.Equal(got.Channels, want.Channels) || !slices.Equal(got.Notes, want.Notes) {
		t.Fatalf("Open: %d frames, %v, %v; Read: %d, %v, %v", got.Len(), got.Channels, got.Notes, want.Len(), want.Channels, want.Notes)
	}
	n, nc := want.Len(), len(want.Channels)
	if n == 0 {
		return
	}
	rng := rand.New(rand.NewPCG(uint64(len(b)), 4))
	for k := 0; k <= spans; k++ {
		lo, hi := 0, n
		if k > 0 {
			lo = rng.IntN(n)
			hi = lo + 1 + rng.IntN(n-lo)
		}
		c := rng.IntN(nc)
		dst := [][]float32{make([]float32, hi-lo)}
		if err := got.Block(dst, []int{c}, lo); err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(dst[0], want.Samples[c][lo:hi]) {
			t.Fatalf("channel %d, frames [%d, %d): streamed samples differ from Read's", c, lo, hi)
		}
	}
}

func TestOpenMatchesRead(t *testing.T) {
	paths, err := filepath.Glob(filepath.Join(dir, "*.wav"))
	if err != nil || len(paths) < 15 {
		t.Fatalf("found %d files: %v", len(paths), err)
	}
	for _, p := range paths {
		t.Run(filepath.Base(p), func(t *testing.T) {
			b, err := os.ReadFile(p)
			if err != nil {
				t.Fatal(err)
			}
			sameAsRead(t, filepath.Base(p), b, 30)
		})
	}
}

// TestOpenIgnoresTheLimit: Open holds no samples, so a budget below the
// file refuses Read and not Open.
func TestOpenIgnoresTheLimit(t *testing.T) {
	b, err := os.ReadFile(filepath.Join(dir, "pcm16-stereo.wav"))
	if err != nil {
		t.Fatal(err)
	}
	defer func(v int64) { data.MaxSampleBytes = v }(data.MaxSampleBytes)
	data.MaxSampleBytes = 8
	var r Reader
	if _, err := r.Read(format.Bytes("s.wav", b)); err == nil {
		t.Fatal("Read under an 8-byte budget succeeded")
	}
	if rec, err := Open(format.Bytes("s.wav", b)); err != nil || !rec.Streamed() {
		t.Fatalf("Open: %v", err)
	}
}

// FuzzOpen: Open agrees with Read on any bytes.
func FuzzOpen(f *testing.F) {
	paths, _ := filepath.Glob(filepath.Join(dir, "*.wav"))
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
		sameAsRead(t, "fuzz.wav", b, 3)
	})
}
