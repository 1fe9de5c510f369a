package all

import "testing"

// TestRecognise checks each kind of file by its content, with names that
// would mislead a guess from the name.
func TestRecognise(t *testing.T) {
	edf := []byte("0       " + "patient x")
	cases := []struct {
		name string
		head string
		want Role
	}{
		{"demo_edf.edf", string(edf), Recording},
		{"anything.dat", "\xffBIOSEMI" + "rest", Recording},
		{"a.csv", "time,Fz,Cz\n0,1,2\n", Recording},
		{"a.tsv", "trial\ttime\tFz\n1\t0\t1\n", Recording},
		{"demo_edf_trials.csv", "trial,response_time,outcome\n1,0.41,hit\n", Trials},
		{"x.csv", "\xef\xbb\xbfTrial;rt\n", Unknown}, // one column: not a trials table
		{"notes.txt", "trial,rt\n1,0.5\n", Trials},
		{"session.tsv", "onset\tduration\ttrial_type\n1.0\t0\ttone\n", Events},
		{"ev.csv", "onset\tduration\n", Events},
		{"chans.txt", "name\ttype\tunits\tstatus\nFz\tEEG\tuV\tgood\n", Channels},
		{"positions.tsv", "name\tx\ty\tz\tmaterial\nFz\t0\t0.71\t0.71\tAg\n", Electrodes},
		{"r.txt", "{\n  \"epochs\": {}, \"analyses\": []}", Recipe},
		{"meta.json", "{\"sampleRate\": 250, \"channels\": [\"Fz\"]}", Sidecar},
		{"x.bin", "hello world\n", Unknown},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := Recognise([]byte(c.head), c.name); got != c.want {
				t.Errorf("Recognise(%q) = %s, want %s", c.head, got, c.want)
			}
		})
	}
}
