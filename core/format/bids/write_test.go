package bids

import (
	"bytes"
	"testing"

	"amplink/core/data"
	"amplink/core/format"
)

func TestWriteEventsRoundTrip(t *testing.T) {
	evs := []data.Event{
		{Onset: 1.5, Duration: 0.1, Type: "tone", Extra: map[string]string{"response_time": "0.412", "outcome": "hit"}},
		{Onset: 4.25, Duration: 0, Type: "tone", Extra: map[string]string{"outcome": "miss"}},
	}
	var b bytes.Buffer
	if err := WriteEvents(&b, evs); err != nil {
		t.Fatal(err)
	}
	want := "onset\tduration\ttrial_type\toutcome\tresponse_time\n1.5\t0.1\ttone\thit\t0.412\n4.25\t0\ttone\tmiss\tn/a\n"
	if b.String() != want {
		t.Errorf("got\n%q\nwant\n%q", b.String(), want)
	}
	got, err := ReadEvents(format.Bytes("e.tsv", b.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 2 || got[1].Onset != 4.25 || got[0].Type != "tone" || got[0].Extra["response_time"] != "0.412" || got[1].Extra["response_time"] != "n/a" {
		t.Errorf("read back %+v", got)
	}
}

func TestWriteChannelsRoundTrip(t *testing.T) {
	var b bytes.Buffer
	chs := []data.Channel{{Name: "Fz", Type: "EEG", Unit: "uV"}, {Name: "Cz", Type: "EEG", Unit: "uV"}}
	if err := WriteChannels(&b, chs, map[string]bool{"Cz": true}); err != nil {
		t.Fatal(err)
	}
	infos, err := ReadChannels(format.Bytes("c.tsv", b.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	if bad := Bad(infos); len(bad) != 1 || bad[0] != "Cz" {
		t.Errorf("bad = %v", bad)
	}
}
