package mp3

import (
	"testing"
)

// BenchmarkDecode reports decode throughput in MB/s of MP3 input (go-mp3
// does the work; this measures the whole reader).
func BenchmarkDecode(b *testing.B) {
	f := readFile(b, "stereo-id3.mp3")
	b.SetBytes(f.Size)
	for b.Loop() {
		if _, err := Decode(f, nil); err != nil {
			b.Fatal(err)
		}
	}
}
