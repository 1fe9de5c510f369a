package analysis

import (
	"bytes"
	"context"
	"errors"
	"io"
	"math/rand/v2"
	"slices"
	"sync"
	"testing"

	"amplink/core/data"
	"amplink/core/format"
	"amplink/core/format/edf"
	"amplink/core/internal/synth"
	"amplink/core/recipe"
)

// longEnvelopes is synth.Envelopes' S, L, G, H and N over 12.5 minutes at
// 200 Hz (150 000 samples), so a continuous envelope analysis has several
// chunks of chunkLen samples.
func longEnvelopes() *data.Recording {
	const rate = 200.0
	rec := &data.Recording{Name: "long.edf", Rate: rate}
	for i, x := range synth.EnvelopeSignals(rand.New(rand.NewPCG(7, 1)), 150000, rate) {
		rec.Channels = append(rec.Channels, data.Channel{Name: synth.EnvelopeNames[i], Unit: "uV"})
		rec.Samples = append(rec.Samples, x)
	}
	return rec
}

// streamRecipe has every kind of continuous envelope unit: plain, pairwise
// with surrogates and Spearman, symmetric (one unit over the whole
// recording), cross-frequency, a comodulogram and a time course.
const streamRecipe = `{
  "spectral": {"low": 4, "high": 48, "steps": 23, "cycles": [4, 8]},
  "analyses": [
    {"id": "plain", "type": "envelope", "channels": "*", "freq": [9, 11], "envelopeRate": 50},
    {"id": "orth", "type": "envelope", "channels": ["S", "L", "G", "N"], "freq": [9, 11], "leakageCorrection": "pairwise", "method": "spearman", "surrogates": 19, "randomSeed": 2, "envelopeRate": 20},
    {"id": "sym", "type": "envelope", "channels": ["S", "G", "N"], "freq": [9, 11], "leakageCorrection": "symmetric", "envelopeRate": 20},
    {"id": "cross", "type": "envelope", "channels": ["S", "H"], "freq": [9, 11], "targetFreq": [38, 42], "envelopeRate": 20},
    {"id": "como", "type": "comodulogram", "channels": ["S", "H"], "freq": [6, 14], "targetFreq": [30, 46]},
    {"id": "segs", "type": "envelope", "channels": ["S", "G"], "freq": [9, 11], "segment": 60, "envelopeRate": 20}
  ]
}`

// readCounter is an io.ReaderAt that records the largest single read.
type readCounter struct {
	r       io.ReaderAt
	mu      sync.Mutex
	largest int
	reads   int
}

func (c *readCounter) ReadAt(p []byte, off int64) (int, error) {
	c.mu.Lock()
	c.largest = max(c.largest, len(p))
	c.reads++
	c.mu.Unlock()
	return c.r.ReadAt(p, off)
}

func writeEDF(t *testing.T, rec *data.Recording) []byte {
	t.Helper()
	var b bytes.Buffer
	if err := edf.Write(&b, rec, edf.WriteOptions{}); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

// TestStreamedEnvelopesEqualHeld: the same EDF file analysed with its
// samples held (edf.Decode) and streamed from the file a chunk at a time
// (edf.Open) gives the same unit values, bit for bit, and the same rows
// and maps, byte for byte. The streamed route never reads more than a
// chunk's records at once.
func TestStreamedEnvelopesEqualHeld(t *testing.T) {
	b := writeEDF(t, longEnvelopes())
	held, _, err := edf.Decode(format.Bytes("long.edf", b))
	if err != nil {
		t.Fatal(err)
	}
	rc := &readCounter{r: bytes.NewReader(b)}
	streamed, _, err := edf.Open(format.File{Name: "long.edf", R: rc, Size: int64(len(b))})
	if err != nil {
		t.Fatal(err)
	}
	if !streamed.Streamed() || streamed.Samples != nil || streamed.Len() != held.Len() {
		t.Fatalf("edf.Open: streamed %v, %d samples per channel; want streamed, %d", streamed.Streamed(), streamed.Len(), held.Len())
	}
	r, err := recipe.Parse([]byte(streamRecipe))
	if err != nil {
		t.Fatal(err)
	}
	run := func(rec *data.Recording) ([]UnitResult, []byte) {
		p, err := NewPlan(r, &Dataset{Name: "long.edf", Recording: rec})
		if err != nil {
			t.Fatal(err)
		}
		var res []UnitResult
		for _, u := range p.Units() {
			ur, err := p.Compute(context.Background(), u.ID)
			if err != nil {
				t.Fatal(err)
			}
			res = append(res, ur)
		}
		out, err := p.Finish(context.Background(), res)
		if err != nil {
			t.Fatal(err)
		}
		return res, synth.Tables(out)
	}
	ru, rt := run(held)
	su, st := run(streamed)
	if len(ru) < 10 {
		t.Fatalf("%d units: the recording should make several chunks per analysis", len(ru))
	}
	for i := range ru {
		if !slices.Equal(ru[i].Values, su[i].Values) && !bitsEqual(ru[i].Values, su[i].Values) {
			t.Errorf("unit %d: streamed values differ from held ones", i)
		}
	}
	if !bytes.Equal(rt, st) {
		t.Errorf("streamed rows and maps differ from held ones:\n%s\n---\n%s", st, rt)
	}
	// edf's streamed reads take at most 1 MiB of records at a time, however
	// long the span a unit asks for (the symmetric unit spans the file).
	if rc.largest > 1<<20 || rc.reads < 10 {
		t.Errorf("%d reads, the largest %d bytes: want reads of at most 1 MiB", rc.reads, rc.largest)
	}
}

// bitsEqual compares float64 slices bit for bit (NaN equals NaN).
func bitsEqual(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] && !(a[i] != a[i] && b[i] != b[i]) {
			return false
		}
	}
	return true
}

// TestStreamedBudgetIsWhatIsHeld: with a sample budget below the whole
// recording, decoding it whole fails, while a streamed envelope analysis,
// which holds one chunk and the binned envelopes, runs; a symmetric
// correction, whose one unit holds the whole recording, is refused with
// an error wrapping data.ErrTooLarge that names the analysis.
func TestStreamedBudgetIsWhatIsHeld(t *testing.T) {
	b := writeEDF(t, longEnvelopes())
	defer func(v int64) { data.MaxSampleBytes = v }(data.MaxSampleBytes)
	// the recording: 5 × 150 000 samples = 3 MB as float32
	data.MaxSampleBytes = 2 << 20
	if _, _, err := edf.Decode(format.Bytes("long.edf", b)); !errors.Is(err, data.ErrTooLarge) {
		t.Fatalf("Decode under a 2 MiB budget: %v, want ErrTooLarge", err)
	}
	rec, _, err := edf.Open(format.Bytes("long.edf", b))
	if err != nil {
		t.Fatal(err)
	}
	ok := `{"spectral": {"low": 4, "high": 48, "steps": 23, "cycles": [4, 8]},
	  "analyses": [{"id": "plain", "type": "envelope", "channels": "*", "freq": [9, 11], "envelopeRate": 20}]}`
	res := runSynthDS(t, ok, &Dataset{Name: "long.edf", Recording: rec})
	if len(res.Rows) != 10 {
		t.Errorf("%d rows, want 10 pairs", len(res.Rows))
	}
	sym := `{"spectral": {"low": 4, "high": 48, "steps": 23, "cycles": [4, 8]},
	  "analyses": [{"id": "sym", "type": "envelope", "channels": "*", "freq": [9, 11], "leakageCorrection": "symmetric", "envelopeRate": 20}]}`
	r, err := recipe.Parse([]byte(sym))
	if err != nil {
		t.Fatal(err)
	}
	_, err = NewPlan(r, &Dataset{Name: "long.edf", Recording: rec})
	if !errors.Is(err, data.ErrTooLarge) || !bytes.Contains([]byte(err.Error()), []byte("analyses[0]")) {
		t.Errorf("symmetric under a 2 MiB budget: %v, want ErrTooLarge naming analyses[0]", err)
	}
}
