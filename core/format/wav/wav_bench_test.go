package wav

import (
	"bytes"
	"testing"

	"amplink/core/format"
)

// BenchmarkDecode reports decode throughput in MB/s of file.
func BenchmarkDecode(b *testing.B) {
	for _, tc := range []struct {
		name string
		enc  Encoding
	}{{"pcm16", PCM16}, {"float32", Float32}} {
		r := randomRecording(1, 8, 1<<18, 0.3) // 8 channels × 262144 frames
		var buf bytes.Buffer
		if err := Write(&buf, r, Options{Encoding: tc.enc}); err != nil {
			b.Fatal(err)
		}
		b.Run(tc.name, func(b *testing.B) {
			b.SetBytes(int64(buf.Len()))
			for b.Loop() {
				if _, err := Decode(format.Bytes("b.wav", buf.Bytes()), nil); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
