package job

import (
	"bytes"
	"context"
	"errors"
	"io"
	"math/rand/v2"
	"strings"
	"testing"

	"amplink/app/wire"
	"amplink/core/format"
)

// sliced is a SliceReader over b whose Fetch copies from b, as the worker's
// reads of Blob slices do.
func sliced(name string, b []byte) *SliceReader {
	return &SliceReader{Name: name, Size: int64(len(b)), Fetch: func(p []byte, off int64) error {
		if off+int64(len(p)) > int64(len(b)) {
			return errors.New("fetch past the end")
		}
		copy(p, b[off:])
		return nil
	}}
}

// TestSliceReaderMatchesBytes: every read returns what bytes.Reader
// returns (bytes, count and io.EOF), whatever its offset and length.
func TestSliceReaderMatchesBytes(t *testing.T) {
	b := make([]byte, 3*SliceWindow+12345)
	rng := rand.New(rand.NewPCG(1, 2))
	for i := range b {
		b[i] = byte(rng.Uint32())
	}
	want := bytes.NewReader(b)
	r := sliced("x.edf", b)
	cases := []struct{ off, n int64 }{
		{0, 0}, {0, 1}, {0, 256}, {SliceWindow - 3, 10}, {SliceWindow, SliceWindow},
		{5, 2*SliceWindow + 7}, {int64(len(b)) - 4, 4}, {int64(len(b)) - 4, 10},
		{int64(len(b)), 1}, {int64(len(b)) + 9, 3},
	}
	for i := 0; i < 300; i++ {
		cases = append(cases, struct{ off, n int64 }{rng.Int64N(int64(len(b)) + 10), rng.Int64N(3 * SliceWindow / 2)})
	}
	for _, c := range cases {
		got, exp := make([]byte, c.n), make([]byte, c.n)
		gn, gerr := r.ReadAt(got, c.off)
		en, eerr := want.ReadAt(exp, c.off)
		if gn != en || !bytes.Equal(got[:gn], exp[:en]) || (gerr == io.EOF) != (eerr == io.EOF) {
			t.Fatalf("ReadAt(%d bytes at %d) = %d, %v; bytes.Reader %d, %v", c.n, c.off, gn, gerr, en, eerr)
		}
	}
	if _, err := r.ReadAt(make([]byte, 1), -1); err == nil || !strings.Contains(err.Error(), "x.edf") {
		t.Errorf("negative offset: %v", err)
	}
}

// TestSliceReaderSequential: small sequential reads (a bufio.Reader's, a
// header's) cost one fetch per window, so the file is read once.
func TestSliceReaderSequential(t *testing.T) {
	b := make([]byte, 3*SliceWindow+100)
	r := sliced("x.csv", b)
	p := make([]byte, 4096)
	for off := int64(0); off < int64(len(b)); off += int64(len(p)) {
		r.ReadAt(p, off)
	}
	if r.Fetches != 4 || r.Fetched != int64(len(b)) {
		t.Errorf("%d fetches of %d bytes for a %d-byte file read in 4 KiB steps; want 4 fetches, each byte once", r.Fetches, r.Fetched, len(b))
	}
}

// TestSliceReaderError: a failed fetch is an error naming the file and
// the offset, not a panic or a silent short read.
func TestSliceReaderError(t *testing.T) {
	r := &SliceReader{Name: "gone.edf", Size: 100, Fetch: func([]byte, int64) error { return ErrShort }}
	_, err := r.ReadAt(make([]byte, 10), 50)
	if err == nil || !strings.Contains(err.Error(), "gone.edf: could not be read at byte 50") || !errors.Is(err, ErrShort) {
		t.Fatalf("error %v", err)
	}
}

// TestHandleSliced runs the same analysis from bytes and from a sliced
// reader over them: the results must be byte-identical, and the sliced
// file is fetched about once (no whole copy beside the decoded data).
func TestHandleSliced(t *testing.T) {
	data := trialsCSV()
	src := wire.Source{Name: "trials.csv"}
	run := func(files []format.File) string {
		var w Worker
		var rp replies
		req := wire.Request{Op: wire.OpRun, Seq: 2, Source: src, Recipe: []byte(smallRecipe), Workers: 1}
		w.HandleFiles(context.Background(), req, files, rp.post)
		_, bufs := rp.last(t, wire.OpUnits)
		rp = replies{}
		w.Handle(context.Background(), wire.Request{Op: wire.OpFinish, Seq: 2}, []string{"units"}, bufs, rp.post)
		rep, _ := rp.last(t, wire.OpResults)
		return rep.CSV
	}
	want := run([]format.File{format.Bytes("trials.csv", data)})
	sr := sliced("trials.csv", data)
	got := run([]format.File{{Name: "trials.csv", R: sr, Size: sr.Size}})
	if got != want {
		t.Fatalf("results from slices differ from results from bytes:\n%s\nwant\n%s", got, want)
	}
	if sr.Fetched > 2*int64(len(data)) {
		t.Errorf("fetched %d bytes of a %d-byte file", sr.Fetched, len(data))
	}
	t.Logf("%d-byte file: %d fetches, %d bytes", len(data), sr.Fetches, sr.Fetched)
}
