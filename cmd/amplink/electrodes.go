package main

import (
	"errors"
	"os"
	"strings"

	"amplink/core/dataset"
	"amplink/core/format"
)

// electrodeFiles is the --electrodes file and the coordsystem.json beside
// it, open for the whole run.
type electrodeFiles struct {
	tsv, coord *format.File
	files      []*os.File
}

// openElectrodes opens path (nothing when it is empty) and, when there is
// one, the coordsystem.json beside it: NAME_electrodes.tsv pairs with
// NAME_coordsystem.json (BIDS naming).
func openElectrodes(path string) (*electrodeFiles, error) {
	if path == "" {
		return nil, nil
	}
	ef := &electrodeFiles{}
	f, osf, err := openFile(path)
	if err != nil {
		return nil, err
	}
	ef.tsv, ef.files = &f, append(ef.files, osf)
	if stem, ok := strings.CutSuffix(path, "_electrodes.tsv"); ok {
		cf, osc, err := openFile(stem + "_coordsystem.json")
		switch {
		case err == nil:
			ef.coord, ef.files = &cf, append(ef.files, osc)
		case !errors.Is(err, os.ErrNotExist):
			ef.close()
			return nil, err
		}
	}
	return ef, nil
}

// attach gives ds the positions (replacing any found beside the data).
func (ef *electrodeFiles) attach(ds *dataset.Dataset) error {
	if ef == nil {
		return nil
	}
	return ds.AttachElectrodes(*ef.tsv, ef.coord)
}

func (ef *electrodeFiles) close() {
	if ef == nil {
		return
	}
	for _, f := range ef.files {
		f.Close()
	}
}
