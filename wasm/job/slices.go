package job

import (
	"errors"
	"fmt"
	"io"
	"sync"
)

// SliceWindow is how much a SliceReader fetches at a time.
const SliceWindow = 1 << 20

// SliceReader is an io.ReaderAt over a file that is read a slice at a
// time (in the browser: Blob.slice of the picked File, read by the worker),
// so the whole file is never in memory. Fetch fills p with the bytes at
// off; it is called for at most SliceWindow bytes, or once for a read
// larger than that, and never past Size. Small reads are served from the
// last window fetched, so the readers' sequential small reads cost one
// fetch per window.
type SliceReader struct {
	Name  string
	Size  int64
	Fetch func(p []byte, off int64) error

	mu     sync.Mutex
	win    []byte
	winOff int64
	// Fetches counts the calls to Fetch, and Fetched their bytes.
	Fetches int
	Fetched int64
}

// ReadAt implements io.ReaderAt.
func (r *SliceReader) ReadAt(p []byte, off int64) (int, error) {
	if off < 0 {
		return 0, fmt.Errorf("%s: read at negative offset %d", r.Name, off)
	}
	r.mu.Lock()
	defer r.mu.Unlock()
	n := 0
	for n < len(p) && off < r.Size {
		rest := p[n:]
		if want := min(int64(len(rest)), r.Size-off); want >= SliceWindow {
			// a large read goes straight into p
			if err := r.fetch(rest[:want], off); err != nil {
				return n, err
			}
			n += int(want)
			off += want
			continue
		}
		if off < r.winOff || off >= r.winOff+int64(len(r.win)) {
			size := min(int64(SliceWindow), r.Size-off)
			if cap(r.win) < int(size) {
				r.win = make([]byte, SliceWindow)
			}
			r.win = r.win[:size]
			if err := r.fetch(r.win, off); err != nil {
				r.win = r.win[:0]
				return n, err
			}
			r.winOff = off
		}
		k := copy(rest, r.win[off-r.winOff:])
		n += k
		off += int64(k)
	}
	if n < len(p) {
		return n, io.EOF
	}
	return n, nil
}

func (r *SliceReader) fetch(p []byte, off int64) error {
	r.Fetches++
	r.Fetched += int64(len(p))
	if err := r.Fetch(p, off); err != nil {
		return fmt.Errorf("%s: could not be read at byte %d: %w", r.Name, off, err)
	}
	return nil
}

// ErrShort is returned by a Fetch that received fewer bytes than asked
// (the file changed on disk after it was picked).
var ErrShort = errors.New("the file is shorter than it was when picked")
