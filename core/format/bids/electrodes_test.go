package bids

import (
	"testing"
)

func TestReadElectrodes(t *testing.T) {
	es, err := ReadElectrodes(openTest(t, "electrodes.tsv"))
	if err != nil {
		t.Fatal(err)
	}
	// the values written in testdata/bids/electrodes.tsv
	want := []Electrode{
		{Name: "Fz", X: 0, Y: 71.2, Z: 88.5, Placed: true, Line: 2},
		{Name: "Cz", X: 0, Y: 0, Z: 95, Placed: true, Line: 3},
		{Name: "T7", X: -89, Y: 0, Z: 29, Placed: true, Line: 4},
		{Name: "REF", Line: 5},
	}
	if len(es) != len(want) {
		t.Fatalf("got %d electrodes, want %d", len(es), len(want))
	}
	for i := range want {
		if es[i] != want[i] {
			t.Errorf("row %d: %+v, want %+v", i, es[i], want[i])
		}
	}
}

func TestReadCoordSystem(t *testing.T) {
	cs, err := ReadCoordSystem(openTest(t, "coordsystem.json"))
	if err != nil || cs != (CoordSystem{System: "CapTrak", Units: "mm"}) {
		t.Fatalf("got %+v, %v", cs, err)
	}
}
