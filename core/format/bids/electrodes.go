package bids

import (
	"encoding/json"
	"errors"
	"io"
	"math"
	"strconv"
	"strings"

	"amplink/core/format"
)

// Electrode is one row of a BIDS electrodes.tsv file: a name and its
// position in the file's coordinate system and units. Placed is false
// when the row gives "n/a" for all three coordinates (BIDS marks an
// electrode without a known position so).
type Electrode struct {
	Name    string
	X, Y, Z float64
	Placed  bool
	Line    int // the row's line in the file, for messages
}

// ReadElectrodes reads a BIDS electrodes.tsv file. The columns name, x, y
// and z are required (matched case-insensitively); other columns (type,
// material, impedance, …) are ignored. A coordinate must be a finite
// number; a row with "n/a" in all three is an electrode without a
// position. Names must be non-empty and distinct. The file is refused,
// naming the line, when a coordinate is NaN, infinite or not a number,
// when only some of a row's coordinates are "n/a", and when every placed
// electrode lies on one point (naming the first and last of them).
func ReadElectrodes(f format.File) ([]Electrode, error) {
	t, err := open(f)
	if err != nil {
		return nil, err
	}
	var idx [4]int
	for i, name := range []string{"name", "x", "y", "z"} {
		if idx[i], err = t.need("electrodes", name); err != nil {
			return nil, err
		}
	}
	out := []Electrode{}
	seen := map[string]int{}
	for {
		fs, line, err := t.row()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		e := Electrode{Name: strings.Clone(fs[idx[0]]), Line: line}
		if e.Name == "" || e.Name == NA {
			return nil, t.r.Errorf(line, idx[0]+1, format.ErrSyntax, "electrode name is missing")
		}
		k := strings.ToLower(e.Name)
		if at, ok := seen[k]; ok {
			return nil, t.r.Errorf(line, idx[0]+1, format.ErrSyntax, "electrode %q is listed again (first at line %d)", e.Name, at)
		}
		seen[k] = line
		na := 0
		for _, i := range idx[1:] {
			if fs[i] == NA {
				na++
			}
		}
		switch na {
		case 3:
			out = append(out, e)
			continue
		case 1, 2:
			return nil, t.r.Errorf(line, 0, format.ErrSyntax, "electrode %q has only some of x, y, z as n/a", e.Name)
		}
		var v [3]float64
		for j, i := range idx[1:] {
			x, err := strconv.ParseFloat(strings.TrimSpace(fs[i]), 64)
			if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
				return nil, t.r.Errorf(line, i+1, format.ErrSyntax, "%s of electrode %q is %q, not a finite number", t.cols[i], e.Name, fs[i])
			}
			v[j] = x
		}
		e.X, e.Y, e.Z, e.Placed = v[0], v[1], v[2], true
		out = append(out, e)
	}
	var placed []Electrode
	for _, e := range out {
		if e.Placed {
			placed = append(placed, e)
		}
	}
	if len(placed) >= 2 {
		same := true
		for _, e := range placed[1:] {
			if e.X != placed[0].X || e.Y != placed[0].Y || e.Z != placed[0].Z {
				same = false
				break
			}
		}
		if same {
			last := placed[len(placed)-1]
			return nil, t.r.Errorf(placed[0].Line, 0, format.ErrSyntax,
				"every electrode (lines %d–%d) is at the same point (%g, %g, %g), so their positions cannot be used",
				placed[0].Line, last.Line, placed[0].X, placed[0].Y, placed[0].Z)
		}
	}
	return out, nil
}

// CoordSystem is what amplink reads of a BIDS coordsystem.json: the EEG
// coordinate system's name and units ("m", "cm", "mm"; "" when absent or
// "n/a").
type CoordSystem struct {
	System string
	Units  string
}

// maxCoordSystem bounds the size of a coordsystem.json file read.
const maxCoordSystem = 1 << 20

// ReadCoordSystem reads the EEGCoordinateSystem and EEGCoordinateUnits
// fields of a BIDS coordsystem.json (for MEG files, MEGCoordinateSystem
// and MEGCoordinateUnits, when the EEG ones are absent). Units other than
// m, cm and mm are refused with the field named.
func ReadCoordSystem(f format.File) (CoordSystem, error) {
	fail := func(off int64, field, msg string) error {
		return &format.Error{Format: "bids", File: f.Name, Offset: off, Field: field, Err: errors.New(msg)}
	}
	if f.Size > maxCoordSystem {
		return CoordSystem{}, fail(-1, "", "file is over 1 MiB; a coordsystem.json is a few lines")
	}
	b, err := io.ReadAll(io.NewSectionReader(f.R, 0, max(f.Size, 0)))
	if err != nil {
		return CoordSystem{}, fail(-1, "", err.Error())
	}
	var m map[string]json.RawMessage
	if err := json.Unmarshal(b, &m); err != nil {
		var se *json.SyntaxError
		if errors.As(err, &se) {
			return CoordSystem{}, fail(se.Offset, "", "not valid JSON: "+se.Error())
		}
		return CoordSystem{}, fail(-1, "", "not a JSON object")
	}
	str := func(key string) (string, error) {
		raw, ok := m[key]
		if !ok {
			return "", nil
		}
		var s string
		if err := json.Unmarshal(raw, &s); err != nil {
			return "", fail(-1, key, "is not a string")
		}
		if s == NA {
			s = ""
		}
		return s, nil
	}
	var cs CoordSystem
	for _, pre := range []string{"EEG", "MEG"} {
		if cs.System == "" {
			if cs.System, err = str(pre + "CoordinateSystem"); err != nil {
				return CoordSystem{}, err
			}
		}
		if cs.Units == "" {
			if cs.Units, err = str(pre + "CoordinateUnits"); err != nil {
				return CoordSystem{}, err
			}
			switch cs.Units {
			case "", "m", "cm", "mm":
			default:
				return CoordSystem{}, fail(-1, pre+"CoordinateUnits", strconv.Quote(cs.Units)+" is not m, cm or mm")
			}
		}
	}
	return cs, nil
}
