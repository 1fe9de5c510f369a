package all

import (
	"bytes"
	"strings"

	"amplink/core/format"
	"amplink/core/format/csv"
)

// Role is what a file is to an analysis: the recording itself or one of its
// companions.
type Role string

// The roles Recognise tells apart.
const (
	Recording  Role = "recording"  // samples: any registered format
	Events     Role = "events"     // a BIDS events table (onset, duration, ...)
	Channels   Role = "channels"   // a BIDS channels table (name, type, units, ...)
	Trials     Role = "trials"     // per-trial values: trial,<name>...
	Electrodes Role = "electrodes" // a BIDS electrodes table (name, x, y, z)
	Recipe     Role = "recipe"     // an analysis recipe (JSON with "analyses")
	Sidecar    Role = "sidecar"    // other JSON, such as the float32 epochs' description
	Unknown    Role = "unknown"
)

// Roles lists every role, for a chooser.
var Roles = []Role{Recording, Events, Channels, Trials, Electrodes, Recipe, Sidecar}

// Recognise says what a file is from its first bytes (at least the first
// line; for JSON, as much as is at hand), whatever its name. Binary formats
// are found by their magic bytes or extension as format.Detect finds them;
// JSON by its first character; delimited text by its header, the way the
// readers check it: trial,time,... and time,... are recordings (csv.Decode),
// trial,<name>... a trials table (csv.DecodeTrials), onset,... events and
// name,type,... channels and name,x,y,z electrodes (bids.ReadEvents,
// bids.ReadChannels, bids.ReadElectrodes).
func Recognise(head []byte, name string) Role {
	trim := bytes.TrimLeft(bytes.TrimPrefix(head, []byte("\xef\xbb\xbf")), " \t\r\n")
	if len(trim) > 0 && trim[0] == '{' {
		if bytes.Contains(trim, []byte(`"analyses"`)) {
			return Recipe
		}
		return Sidecar
	}
	if f, ok := format.Detect(head, name); ok && !f.Fallback {
		return Recording
	}
	hdr, _, err := csv.NewReader(format.Bytes(name, head)).Header()
	if err != nil || len(hdr) == 0 {
		return Unknown
	}
	col := func(i int) string {
		if i < len(hdr) {
			return strings.ToLower(hdr[i])
		}
		return ""
	}
	has := func(want string) bool {
		for _, h := range hdr {
			if strings.EqualFold(h, want) {
				return true
			}
		}
		return false
	}
	switch {
	case col(0) == "trial" && col(1) == "time", col(0) == "time" && len(hdr) > 1:
		return Recording
	case col(0) == "trial" && len(hdr) > 1:
		return Trials
	case has("onset"):
		return Events
	case has("name") && has("x") && has("y") && has("z"):
		return Electrodes
	case has("name") && (has("type") || has("units")):
		return Channels
	}
	return Unknown
}
