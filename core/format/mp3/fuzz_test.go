package mp3

import (
	"os"
	"path/filepath"
	"testing"

	"amplink/core/format"
)

// FuzzDecode is seeded with every MP3 file in testdata/mp3.
func FuzzDecode(f *testing.F) {
	names, _ := filepath.Glob(filepath.Join(dir, "*.mp3"))
	for _, p := range names {
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		d, err := Decode(format.Bytes("z.mp3", b), nil)
		if err != nil {
			if _, ok := err.(*format.Error); !ok {
				t.Fatalf("error %T is not a *format.Error: %v", err, err)
			}
			return
		}
		r := d.Recording
		if len(r.Samples) < 1 || len(r.Samples) > 2 || r.Len() == 0 || r.Rate <= 0 {
			t.Fatalf("%d channels of %d samples at %g Hz", len(r.Samples), r.Len(), r.Rate)
		}
		for _, s := range r.Samples {
			if len(s) != r.Len() {
				t.Fatal("channels differ in length")
			}
			for _, v := range s {
				if v < -1 || v >= 1 {
					t.Fatalf("sample %v outside [-1, 1)", v)
				}
			}
		}
	})
}
