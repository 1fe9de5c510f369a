package f32

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"amplink/core/format"
)

// FuzzDecode feeds a sidecar and a binary together, seeded with every pair
// in testdata/f32. A decoded pair must validate and survive Write and a
// second decode unchanged.
func FuzzDecode(f *testing.F) {
	names, _ := filepath.Glob(filepath.Join(dir, "*.json"))
	for _, p := range names {
		bin, err := os.ReadFile(strings.TrimSuffix(p, ".json") + ".f32")
		if err != nil {
			continue
		}
		side, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(side, bin)
	}
	// Hostile sidecars: a key given twice, data after the object, a BOM.
	bin := make([]byte, 8)
	const ok = `"sampleRate": 500, "channels": ["A"], "trials": 1, "samples": 2, "start": 0`
	for _, side := range []string{`{` + ok + `, "samples": 0}`, `{` + ok + `}}`, `{` + ok + `}]`, "\uFEFF{" + ok + `}`, `{"sampleRate": 1e9, "channels": ["A"], "trials": 1, "samples": 2, "start": 0}`} {
		f.Add([]byte(side), bin)
	}
	f.Fuzz(func(t *testing.T, side, bin []byte) {
		d, err := Decode(format.Bytes("z.f32", bin), mapSib{"z.json": side})
		if err != nil {
			if _, ok := err.(*format.Error); !ok {
				t.Fatalf("error %T is not a *format.Error: %v", err, err)
			}
			return
		}
		e := d.Epochs
		if err := e.Validate(); err != nil {
			t.Fatal(err)
		}
		var b2, s2 bytes.Buffer
		if err := Write(&b2, &s2, e); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(b2.Bytes(), bin) {
			t.Fatal("binary changed in a round trip")
		}
		d2, err := Decode(format.Bytes("z.json", s2.Bytes()), mapSib{"z.f32": b2.Bytes()})
		if err != nil {
			t.Fatal(err)
		}
		if d2.Epochs.Rate != e.Rate || d2.Epochs.Start != e.Start || len(d2.Epochs.Channels) != len(e.Channels) {
			t.Fatal("header changed in a round trip")
		}
	})
}
