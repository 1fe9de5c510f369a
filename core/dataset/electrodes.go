package dataset

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"amplink/core/data"
	"amplink/core/format"
	"amplink/core/format/bids"
	"amplink/core/sensors"
)

// Electrodes says where a dataset's channels sit on the head. Without a
// file, a channel is placed by its name (the built-in 10-10 positions of
// core/sensors, with the aliases T3/T7, T4/T8, T5/P7, T6/P8). With a BIDS
// electrodes.tsv, only the file's positions are used: each is taken as a
// direction from the coordinate origin, which BIDS EEG coordinate systems
// put between the preauricular points, and coordinate systems whose x
// axis points to the nasion and y to the left ear (CTF, EEGLAB,
// EEGLAB-HJ, 4DBti, KitYokogawa, ChietiItab; BIDS appendix on coordinate
// systems, from memory) are turned to x right, y anterior.
type Electrodes struct {
	File   string // the electrodes.tsv, or "" for the built-in positions
	Units  string // from coordsystem.json, or ""
	System string // the coordinate system's name from coordsystem.json, or ""
	placed int    // electrodes with a position in the file
	pos    map[string]sensors.Point
}

// alsSystems are BIDS coordinate systems with x anterior, y left, z up.
var alsSystems = map[string]bool{"ctf": true, "eeglab": true, "eeglab-hj": true, "4dbti": true, "kityokogawa": true, "chietiitab": true}

// ReadElectrodes reads a BIDS electrodes.tsv and, when coord is not nil,
// its coordsystem.json. A placed electrode at the origin has no direction
// and is refused, naming the file and line.
func ReadElectrodes(f format.File, coord *format.File) (*Electrodes, error) {
	es, err := bids.ReadElectrodes(f)
	if err != nil {
		return nil, err
	}
	el := &Electrodes{File: f.Name, pos: map[string]sensors.Point{}}
	als := false
	if coord != nil {
		cs, err := bids.ReadCoordSystem(*coord)
		if err != nil {
			return nil, err
		}
		el.Units, el.System = cs.Units, cs.System
		als = alsSystems[strings.ToLower(cs.System)]
	}
	for _, e := range es {
		if !e.Placed {
			continue
		}
		p := sensors.Point{X: e.X, Y: e.Y, Z: e.Z}
		if als {
			p = sensors.Point{X: -e.Y, Y: e.X, Z: e.Z}
		}
		if p.Norm() == 0 || math.IsInf(p.Norm(), 0) {
			return nil, &format.Error{Format: "bids", File: f.Name, Line: e.Line, Offset: -1,
				Err: fmt.Errorf("electrode %q is at the coordinate origin, so it has no direction from the head's centre", e.Name)}
		}
		el.pos[strings.ToLower(e.Name)] = p
		el.placed++
	}
	return el, nil
}

// Position returns where channel ch sits, as a unit vector.
func (el *Electrodes) Position(ch data.Channel) (sensors.Point, bool) {
	if el == nil || el.File == "" {
		p, _, ok := sensors.Standard(ch.Name)
		if !ok && ch.Label != "" {
			p, _, ok = sensors.Standard(ch.Label)
		}
		return p, ok
	}
	for _, n := range []string{ch.Name, ch.Label} {
		if n == "" {
			continue
		}
		if p, ok := el.pos[strings.ToLower(n)]; ok {
			return p.Scale(1 / p.Norm()), true
		}
	}
	return sensors.Point{}, false
}

// Source describes where positions come from, for notes.
func (el *Electrodes) Source() string {
	if el == nil || el.File == "" {
		return "the built-in 10-10 positions"
	}
	return el.File
}

// AttachElectrodes makes the positions in f (a BIDS electrodes.tsv, with
// coord its coordsystem.json or nil) the dataset's, replacing any found
// beside the recording.
func (ds *Dataset) AttachElectrodes(f format.File, coord *format.File) error {
	el, err := ReadElectrodes(f, coord)
	if err != nil {
		return err
	}
	ds.Electrodes = el
	note := fmt.Sprintf("electrode positions from %s (%d placed", f.Name, el.placed)
	if el.System != "" {
		note += ", " + el.System
	}
	if el.Units != "" {
		note += ", " + el.Units
	}
	ds.Notes = append(ds.Notes, note+"); only their directions from the origin are used")
	return nil
}

// openElectrodes reads a sibling "<stem>_electrodes.tsv" (with a sibling
// "<stem>_coordsystem.json" when there is one).
func (ds *Dataset) openElectrodes(sib format.Siblings, name string) error {
	ef, err := openSibling(sib, name, "_electrodes.tsv")
	if errors.Is(err, format.ErrNoSibling) {
		return nil
	}
	if err != nil {
		return err
	}
	var coord *format.File
	if cf, err := openSibling(sib, name, "_coordsystem.json"); err == nil {
		coord = &cf
	} else if !errors.Is(err, format.ErrNoSibling) {
		return err
	}
	return ds.AttachElectrodes(ef, coord)
}
