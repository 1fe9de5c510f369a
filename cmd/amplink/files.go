package main

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"

	"amplink/core/format"
)

// openFile opens a file for the core. The caller closes it.
func openFile(path string) (format.File, *os.File, error) {
	f, err := os.Open(path)
	if err != nil {
		return format.File{}, nil, err
	}
	st, err := f.Stat()
	if err != nil {
		f.Close()
		return format.File{}, nil, err
	}
	if st.IsDir() {
		f.Close()
		return format.File{}, nil, fmt.Errorf("%s is a directory", path)
	}
	return format.File{Name: path, R: f, Size: st.Size()}, f, nil
}

// dirSiblings opens files beside the input, in its directory.
type dirSiblings struct {
	dir    string
	opened []*os.File
}

func (d *dirSiblings) Open(name string) (format.File, error) {
	p := filepath.Join(d.dir, filepath.Base(name))
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
