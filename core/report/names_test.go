package report

import "testing"

// TestUniqueNamesForChannelsThatSanitiseAlike guards against distinct
// channel names (A/B, A_B, "A B") overwriting each other's map and figure
// files: names stay safe file names, become unique (also ignoring case),
// and a name's file does not depend on the other names.
func TestUniqueNamesForChannelsThatSanitiseAlike(t *testing.T) {
	for _, tc := range []struct {
		name string
		in   []string
		want []string
	}{
		{"distinct safe names unchanged", []string{"a_Fz_r", "a_Cz_r"}, []string{"a_Fz_r", "a_Cz_r"}},
		{"slash, underscore and space", []string{"m_A/B_r", "m_A_B_r", "m_A B_r"}, nil},
		{"case only", []string{"m_FZ", "m_Fz"}, nil},
		{"identical names numbered", []string{"x", "x"}, []string{"x", "x_2"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := UniqueNames(tc.in, '_')
			if tc.want != nil {
				for i := range got {
					if got[i] != tc.want[i] {
						t.Fatalf("UniqueNames(%q) = %q, want %q", tc.in, got, tc.want)
					}
				}
				return
			}
			seen := map[string]bool{}
			for _, g := range got {
				if seen[g] || SafeName(g, '_') != g {
					t.Fatalf("UniqueNames(%q) = %q: not unique safe names", tc.in, got)
				}
				seen[g] = true
			}
		})
	}
	// Stable: a name's file does not depend on the others or their order.
	a := UniqueNames([]string{"m_A/B_r", "m_A_B_r"}, '_')
	b := UniqueNames([]string{"m_A B_r", "m_A_B_r", "m_A/B_r"}, '_')
	if a[0] != b[2] || a[1] != b[1] {
		t.Fatalf("names change with the other names: %q vs %q", a, b)
	}
}
