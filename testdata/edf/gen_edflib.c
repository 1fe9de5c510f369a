/*
 * gen_edflib.c writes two small reference files with EDFlib (Debian
 * libedf-dev), an implementation independent of amplink:
 *
 *   edflib-plus.edf  EDF+C, 16-bit, 10 records of 1 s:
 *                    3 signals at 256 Hz and 1 signal at 128 Hz, 4 annotations
 *   edflib-plus.bdf  BDF+C, 24-bit, 8 records of 1 s:
 *                    3 signals at 256 Hz, subsecond start 0.25 s, 3 annotations
 *
 * Build and run (from testdata/edf):
 *   gcc -O2 -o /tmp/gen gen_edflib.c -ledf -lm && /tmp/gen
 *
 * The Go test (core/format/edf/edflib_test.go) recomputes value() below and
 * checks every decoded sample against it within one digital step.
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <edflib.h>

/* value returns the physical value of signal s at time t (seconds). */
static double value(int s, double t)
{
	switch (s) {
	case 0: return 100.0 * sin(2.0 * M_PI * 10.0 * t);               /* 10 Hz sine, 100 uV */
	case 1: return 400.0 * (t - floor(t)) - 200.0;                    /* 1 Hz ramp -200..200 uV */
	case 2: return 50.0 * sin(2.0 * M_PI * 3.0 * t) + 20.0 * cos(2.0 * M_PI * 7.0 * t); /* two sines */
	default: return 30.0 * sin(2.0 * M_PI * 1.0 * t) + 5.0;           /* 1 Hz sine + offset */
	}
}

static void die(const char *what, int rc)
{
	fprintf(stderr, "gen_edflib: %s failed (%d)\n", what, rc);
	exit(1);
}

#define CHECK(call) do { int rc_ = (call); if (rc_ != 0) die(#call, rc_); } while (0)

static void write_file(const char *path, int bdf)
{
	static const char *labels[4] = {"EEG Fz-Ref", "EEG Cz-Ref", "EEG Pz-Ref", "Resp nasal"};
	int nsig = bdf ? 3 : 4;
	int rates[4] = {256, 256, 256, 128};
	int records = bdf ? 8 : 10;
	int h = edfopen_file_writeonly(path, bdf ? EDFLIB_FILETYPE_BDFPLUS : EDFLIB_FILETYPE_EDFPLUS, nsig);
	if (h < 0)
		die("edfopen_file_writeonly", h);
	for (int s = 0; s < nsig; s++) {
		CHECK(edf_set_samplefrequency(h, s, rates[s]));
		CHECK(edf_set_physical_maximum(h, s, s == 3 ? 100.0 : 500.0));
		CHECK(edf_set_physical_minimum(h, s, s == 3 ? -100.0 : -500.0));
		CHECK(edf_set_digital_maximum(h, s, bdf ? 8388607 : 32767));
		CHECK(edf_set_digital_minimum(h, s, bdf ? -8388608 : -32768));
		CHECK(edf_set_label(h, s, labels[s]));
		CHECK(edf_set_physical_dimension(h, s, "uV"));
	}
	if (bdf) {
		CHECK(edf_set_startdatetime(h, 2003, 4, 5, 6, 7, 8));
		CHECK(edf_set_subsecond_starttime(h, 2500000)); /* 0.25 s in 100 ns units */
	} else {
		CHECK(edf_set_startdatetime(h, 1999, 12, 31, 23, 59, 58));
	}
	double buf[256];
	for (int r = 0; r < records; r++) {
		for (int s = 0; s < nsig; s++) {
			for (int k = 0; k < rates[s]; k++)
				buf[k] = value(s, r + (double)k / rates[s]);
			CHECK(edfwrite_physical_samples(h, buf));
		}
	}
	/* onset and duration in units of 100 us; duration -1 means none */
	if (bdf) {
		CHECK(edfwrite_annotation_utf8(h, 10000, 5000, "tone"));
		CHECK(edfwrite_annotation_utf8(h, 32500, -1, "button"));
		CHECK(edfwrite_annotation_utf8(h, 60000, 2500, "tone"));
	} else {
		CHECK(edfwrite_annotation_utf8(h, 15000, 1000, "tone"));
		CHECK(edfwrite_annotation_utf8(h, 42500, 1000, "tone"));
		CHECK(edfwrite_annotation_utf8(h, 60000, -1, "button"));
		CHECK(edfwrite_annotation_utf8(h, 81234, 0, "r\xc3\xa9ponse")); /* "réponse" in UTF-8 */
	}
	CHECK(edfclose_file(h));
}

int main(void)
{
	write_file("edflib-plus.edf", 0);
	write_file("edflib-plus.bdf", 1);
	printf("edflib version %d\n", edflib_version());
	return 0;
}
