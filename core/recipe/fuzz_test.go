package recipe

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"

	"amplink/core/demo"
)

// FuzzParse feeds recipes to Parse, seeded with the demo recipe, the CLI's
// recipes in testdata and the hostile cases: trailing data, a key given
// twice, a text cut short, a byte order mark. Parse must never panic, and
// an accepted recipe's resolved JSON must parse again to the same JSON.
func FuzzParse(f *testing.F) {
	f.Add(demo.Recipe())
	names, _ := filepath.Glob("../../testdata/cli/*.json")
	for _, p := range names {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(b)
		}
	}
	const win = `"seed":{"channel":"A","time":[0,1],"freq":[4,8]},"target":{"channel":"B","time":[0,1],"freq":[4,8]}`
	for _, s := range []string{
		`{"analyses":[{"type":"trial-window",` + win + `}]}}`,
		`{"analyses":[{"type":"trial-window",` + win + `}]}]`,
		`{"analyses":[{"type":"trial-window","permutations":1000,` + win + `,"permutations":0}]}`,
		`{"analyses":[{"type":"trial-window",` + win + `}],"analyses":[]}`,
		`{"spectral": {"low": 2, "high": 20`,
		"\uFEFF{\"analyses\":[{\"type\":\"trial-window\"," + win + "}]}",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		r, err := Parse(b)
		if err != nil {
			return
		}
		j := r.JSON()
		r2, err := Parse(j)
		if err != nil {
			t.Fatalf("the resolved recipe does not parse: %v\n%s", err, j)
		}
		if !bytes.Equal(r2.JSON(), j) {
			t.Fatalf("resolved JSON changed on a second parse:\n%s\n%s", j, r2.JSON())
		}
	})
}
