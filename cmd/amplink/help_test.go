package main

import (
	"bytes"
	"strings"
	"testing"
)

// TestHelp checks that every command explains itself on -h and exits 0
// (run returns nil), and that the top-level help lists every flag of run.
func TestHelp(t *testing.T) {
	cases := []struct {
		args []string
		want []string
	}{
		{[]string{"-h"}, []string{"amplink run", "amplink merge", "-groups", "-workers", "-trials", "-events", "-level", "-recipe", "-out"}},
		{[]string{"--help"}, []string{"Flags of run:"}},
		{[]string{"run", "-h"}, []string{"Usage: amplink run", "Analyse one or more recordings", "Flags:", "-groups", "-workers", "-trials"}},
		{[]string{"run", "--recipe", "x.json", "--help"}, []string{"Usage: amplink run"}},
		{[]string{"merge", "-h"}, []string{"Usage: amplink merge", "RESULTS.csv", "-figures", "-level"}},
		{[]string{"demo", "--help"}, []string{"Usage: amplink demo", "simulated demo", "-out"}},
		{[]string{"site", "-h"}, []string{"Usage: amplink site", "-src"}},
		{[]string{"serve", "-h"}, []string{"Usage: amplink serve", "-addr"}},
		{[]string{"help", "merge"}, []string{"Usage: amplink merge"}},
		{[]string{"--version"}, []string{"amplink "}},
	}
	for _, c := range cases {
		t.Run(strings.Join(c.args, " "), func(t *testing.T) {
			var out, errOut bytes.Buffer
			if err := run(&out, &errOut, c.args); err != nil {
				t.Fatalf("exit with error %v (stderr %q)", err, errOut.String())
			}
			for _, w := range c.want {
				if !strings.Contains(out.String(), w) {
					t.Errorf("stdout lacks %q:\n%s", w, out.String())
				}
			}
		})
	}
}
