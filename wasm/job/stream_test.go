package job

import (
	"bytes"
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"amplink/app/wire"
	"amplink/core/data"
	"amplink/core/dataset"
	"amplink/core/format"
	"amplink/core/format/edf"
	"amplink/core/pipeline"
	"amplink/core/recipe"
	"amplink/core/report"
)

// streamEDF is a 4-channel, 300 s, 500 Hz EDF: 600 000 samples, 2.4 MB as
// float32 (1.2 MB in the file).
func streamEDF(t *testing.T) []byte {
	t.Helper()
	const rate, n = 500.0, 150000
	rng := rand.New(rand.NewPCG(5, 5))
	rec := &data.Recording{Name: "long.edf", Rate: rate}
	for c, name := range []string{"Fz", "Cz", "Pz", "Oz"} {
		rec.Channels = append(rec.Channels, data.Channel{Name: name, Unit: "uV"})
		x := make([]float32, n)
		for k := range x {
			am := 1 + 0.5*math.Sin(2*math.Pi*0.1*float64(k)/rate+float64(c))
			x[k] = float32(am*math.Sin(2*math.Pi*10*float64(k)/rate) + rng.NormFloat64())
		}
		rec.Samples = append(rec.Samples, x)
	}
	var b bytes.Buffer
	if err := edf.Write(&b, rec, edf.WriteOptions{}); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

const streamRecipe = `{"spectral": {"low": 4, "high": 30, "steps": 12, "cycles": [3, 8]},
  "analyses": [{"id": "alpha", "type": "envelope", "channels": "*", "freq": [8, 12], "leakageCorrection": "pairwise", "envelopeRate": 10}]}`

// TestEnvelopeStreamsAboveBudget: an envelope recipe on a recording whose
// samples exceed the worker's sample budget runs, reading the file in
// slices as it goes (never the whole file at once), and gives the rows a
// native run with the samples held gives.
func TestEnvelopeStreamsAboveBudget(t *testing.T) {
	b := streamEDF(t)
	r, err := recipe.Parse([]byte(streamRecipe))
	if err != nil {
		t.Fatal(err)
	}
	// the native reference, samples held, no budget
	held, _, err := edf.Decode(format.Bytes("long.edf", b))
	if err != nil {
		t.Fatal(err)
	}
	ref, err := pipeline.Run(context.Background(), r, &dataset.Dataset{Name: "long.edf", Format: "edf", Recording: held}, nil)
	if err != nil {
		t.Fatal(err)
	}
	AddRecording(ref, "long.edf")
	var want bytes.Buffer
	if err := report.WriteCSV(&want, ref); err != nil {
		t.Fatal(err)
	}

	defer func(v int64) { data.MaxSampleBytes = v }(data.MaxSampleBytes)
	data.MaxSampleBytes = 3 << 19 // 1.5 MiB: less than the 2.4 MB of samples
	if _, _, err := edf.Decode(format.Bytes("long.edf", b)); !errors.Is(err, data.ErrTooLarge) {
		t.Fatalf("the recording fits the budget (%v): the test would prove nothing", err)
	}
	sr := sliced("long.edf", b)
	file := format.File{Name: "long.edf", R: sr, Size: int64(len(b))}
	if heldBytes([]format.File{file}) != 0 {
		t.Errorf("a streamed EDF counts %d bytes as held", heldBytes([]format.File{file}))
	}
	src := wire.Source{Name: "long.edf"}
	var w Worker
	var rp replies
	w.HandleFiles(context.Background(), wire.Request{Op: wire.OpRun, Seq: 1, Source: src, Recipe: []byte(streamRecipe), Workers: 1}, []format.File{file}, rp.post)
	_, bufs := rp.last(t, wire.OpUnits)
	if sr.Fetched == 0 || sr.Fetches < 3 {
		t.Errorf("%d fetches of %d bytes: the file was not read in slices", sr.Fetches, sr.Fetched)
	}
	w.Handle(context.Background(), wire.Request{Op: wire.OpFinish, Seq: 1}, []string{"units"}, bufs, rp.post)
	rep, _ := rp.last(t, wire.OpResults)
	if rep.CSV != want.String() {
		t.Errorf("streamed results differ from the native held ones:\n%s\nwant\n%s", rep.CSV, want.String())
	}
	// a held format (CSV) counts its bytes
	if n := heldBytes([]format.File{format.Bytes("x.csv", []byte("time,a\n0,1\n"))}); n != 11 {
		t.Errorf("a CSV counts %d bytes, want 11", n)
	}
}
