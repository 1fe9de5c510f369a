package main

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"

	"amplink/core/format"
)

// checkRegular refuses anything but a regular file (after following
// symbolic links) before it is opened: a named pipe would block the run
// forever, a device would never end.
func checkRegular(path string) error {
	st, err := os.Stat(path)
	if err != nil {
		var pe *fs.PathError
		if errors.As(err, &pe) {
			pe.Op = "open" // as os.Open would say
		}
		return err
	}
	switch m := st.Mode(); {
	case m.IsRegular():
		return nil
	case m.IsDir():
		return fmt.Errorf("%s is a directory", path)
	case m&fs.ModeNamedPipe != 0:
		return fmt.Errorf("%s is a named pipe, not a regular file; amplink reads files only", path)
	default:
		return fmt.Errorf("%s is not a regular file (%v); amplink reads files only", path, m.Type())
	}
}

// readRegular reads a whole regular file (see checkRegular).
func readRegular(path string) ([]byte, error) {
	if err := checkRegular(path); err != nil {
		return nil, err
	}
	return os.ReadFile(path)
}

// openFile opens a regular file for the core. The caller closes it.
func openFile(path string) (format.File, *os.File, error) {
	if err := checkRegular(path); err != nil {
		return format.File{}, nil, err
	}
	f, err := os.Open(path)
	if err != nil {
		return format.File{}, nil, err
	}
	st, err := f.Stat()
	if err != nil {
		f.Close()
		return format.File{}, nil, err
	}
	if !st.Mode().IsRegular() {
		f.Close()
		return format.File{}, nil, fmt.Errorf("%s is not a regular file", path)
	}
	return format.File{Name: path, R: f, Size: st.Size()}, f, nil
}

// dirSiblings opens files beside the input, in its directory, or with
// nested set (a BIDS dataset's files, for the core) by their
// slash-separated path below dir.
type dirSiblings struct {
	dir    string
	nested bool
	opened []*os.File
}

func (d *dirSiblings) Open(name string) (format.File, error) {
	p := filepath.Join(d.dir, filepath.Base(name))
	if d.nested {
		p = filepath.Join(d.dir, filepath.FromSlash(name))
	}
	ff, f, err := openFile(p)
	if errors.Is(err, fs.ErrNotExist) {
		return format.File{}, fmt.Errorf("%s: %w", p, format.ErrNoSibling)
	}
	if err != nil {
		return format.File{}, err
	}
	d.opened = append(d.opened, f)
	return ff, nil
}

func (d *dirSiblings) Close() {
	for _, f := range d.opened {
		f.Close()
	}
	d.opened = nil
}
