package wav

import (
	"os"
	"path/filepath"
	"testing"

	"amplink/core/format"
)

// FuzzDecode is seeded with every WAV file in testdata/wav.
func FuzzDecode(f *testing.F) {
	names, _ := filepath.Glob(filepath.Join(dir, "*.wav"))
	for _, p := range names {
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		d, err := Decode(format.Bytes("z.wav", b), nil)
		if err != nil {
			if _, ok := err.(*format.Error); !ok {
				t.Fatalf("error %T is not a *format.Error: %v", err, err)
			}
			return
		}
		r := d.Recording
		if len(r.Samples) == 0 || len(r.Samples) > MaxChannels || len(r.Channels) != len(r.Samples) || r.Rate <= 0 {
			t.Fatalf("%d channels at %g Hz", len(r.Samples), r.Rate)
		}
		for _, s := range r.Samples {
			if len(s) != r.Len() || len(s) == 0 {
				t.Fatal("channels differ in length")
			}
		}
		if int64(r.Len()*len(r.Samples)) > int64(len(b)) {
			t.Fatalf("%d samples from %d bytes", r.Len()*len(r.Samples), len(b))
		}
	})
}
