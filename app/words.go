package app

import (
	"regexp"
	"strconv"
	"strings"
)

// The page speaks the form's language: a recipe error names its field by
// its JSON path ("analyses[3].seed.freq: …", which the CLI keeps), and the
// page says it as the form's headings and labels do ("Analysis 4, seed
// band: …"), positions counted from 1.

var (
	messagePath = regexp.MustCompile(`^((?:epochs|spectral|analyses|figures)(?:[A-Za-z0-9_.]|\[[0-9]+\])*): `)
	analysisRef = regexp.MustCompile(`analyses\[([0-9]+)\]`)
)

// pathWords names the parts of an analysis's fields.
var pathWords = map[string]string{
	"seed": "seed window", "seed.channel": "seed channel", "seed.time": "seed times",
	"seed.time[0]": "seed from", "seed.time[1]": "seed to", "seed.freq": "seed band",
	"seed.freq[0]": "seed band low", "seed.freq[1]": "seed band high",
	"target": "target window", "target.channel": "target channel", "target.time": "target times",
	"target.time[0]": "target from", "target.time[1]": "target to", "target.freq": "target band",
	"target.freq[0]": "target band low", "target.freq[1]": "target band high",
	"id": "name", "type": "analysis type", "method": "correlation", "channels": "channels",
	"freq": "envelope band", "freq[0]": "envelope band low", "freq[1]": "envelope band high",
	"targetFreq": "second band", "targetFreq[0]": "second band low", "targetFreq[1]": "second band high",
	"permutations": "permutations", "randomSeed": "random seed", "correction": "multiple-test correction",
	"level": "confidence level", "covariates": "covariates", "conditions": "conditions",
	"conditions.column": "condition column", "conditions.compare": "compared levels",
	"conditions.compare[0]": "compare level", "conditions.compare[1]": "with level",
	"clusterThreshold": "cluster-forming p", "timeStep": "map time step",
	"orthogonalize": "leakage correction", "segment": "segment length", "envelopeRate": "envelope rate",
	"trials": "trials", "surrogates": "surrogates", "over": "envelopes over",
}

// topWords names the settings above the analyses.
var topWords = map[string]string{
	"epochs": "Epochs", "epochs.event": "Epochs, event type", "epochs.start": "Epochs, start",
	"epochs.end": "Epochs, end", "spectral": "Frequencies", "spectral.low": "Lowest frequency",
	"spectral.high": "Highest frequency", "spectral.steps": "Number of frequencies",
	"spectral.spacing": "Frequency spacing", "spectral.cycles": "Cycles",
	"spectral.cycles[0]": "Cycles at lowest", "spectral.cycles[1]": "Cycles at highest",
	"spectral.tolerance": "Window-power tolerance", "spectral.method": "Spectral method",
	"figures": "Figures", "figures.powerScale": "Power colour scale",
	"analyses": "Analyses",
}

// Words splits a message into the form's words and the JSON path it came
// with ("" when it names no field).
func Words(msg string) (words, path string) {
	m := messagePath.FindStringSubmatchIndex(msg)
	if m == nil {
		return renumber(msg), ""
	}
	path, rest := msg[m[2]:m[3]], msg[m[1]:]
	return fieldWords(path) + ": " + renumber(rest), path
}

// Human is Words without the path.
func Human(msg string) string {
	w, _ := Words(msg)
	return w
}

// fieldWords says a field path as the form labels it.
func fieldWords(path string) string {
	if w, ok := topWords[path]; ok {
		return w
	}
	if strings.HasPrefix(path, "analyses[") {
		end := strings.IndexByte(path, ']')
		n, err := strconv.Atoi(path[len("analyses["):end])
		if err == nil {
			head := "Analysis " + strconv.Itoa(n+1)
			rest := strings.TrimPrefix(path[end+1:], ".")
			if rest == "" {
				return head
			}
			if w, ok := pathWords[rest]; ok {
				return head + ", " + w
			}
			return head + ", " + rest
		}
	}
	return path
}

// renumber says "analysis 4" for "analyses[3]" inside a message.
func renumber(s string) string {
	return analysisRef.ReplaceAllStringFunc(s, func(m string) string {
		n, _ := strconv.Atoi(analysisRef.FindStringSubmatch(m)[1])
		return "analysis " + strconv.Itoa(n+1)
	})
}

// checkChannels reports a channel named in the form that the recording
// does not have, in the recipe's field-path form (so that KeyFor finds the
// input), while the user types rather than at Run.
func (p *Page) checkChannels() error {
	if p.summary == nil || len(p.summary.Channels) == 0 {
		return nil
	}
	have := map[string]bool{"*": true}
	for _, c := range p.summary.Channels {
		have[c] = true
	}
	for i := 0; i < p.form.Analyses; i++ {
		pre := "analyses." + strconv.Itoa(i) + "."
		for _, k := range []string{"seed.channel", "target.channel", "channels"} {
			if _, ok := p.form.Values[pre+k]; !ok {
				continue
			}
			for _, name := range splitList(p.form.get(pre + k)) {
				if !have[name] {
					return &channelError{path: RecipePath(pre + k), name: name, file: p.summary.Name, chans: p.summary.Channels}
				}
			}
		}
	}
	return nil
}

type channelError struct {
	path, name, file string
	chans            []string
}

func (e *channelError) Error() string {
	list := e.chans
	more := ""
	if len(list) > 12 {
		list, more = list[:12], ", …"
	}
	return e.path + ": " + strconv.Quote(e.name) + " is not a channel of " + e.file + " (it has " + strings.Join(list, ", ") + more + ")"
}
