/*
 * check_edflib.c opens an EDF+/BDF+ file with EDFlib (Debian libedf-dev) and
 * prints what EDFlib sees, one tab-separated record per line. It is run on
 * files written by amplink's writer; its output is committed as a golden
 * (ours.edf.edflib.txt, ours.bdf.edflib.txt) that the Go tests compare with
 * amplink's own reading of the same bytes.
 *
 *   gcc -O2 -o /tmp/check check_edflib.c -ledf -lm
 *   /tmp/check ours.edf > ours.edf.edflib.txt
 */
#include <stdio.h>
#include <edflib.h>

int main(int argc, char **argv)
{
	struct edf_hdr_struct hdr;
	if (argc != 2) {
		fprintf(stderr, "usage: check_edflib FILE\n");
		return 2;
	}
	if (edfopen_file_readonly(argv[1], &hdr, EDFLIB_READ_ALL_ANNOTATIONS) < 0) {
		printf("error\t%d\n", hdr.filetype);
		return 1;
	}
	printf("filetype\t%d\n", hdr.filetype);
	printf("signals\t%d\n", hdr.edfsignals);
	printf("records\t%lld\n", hdr.datarecords_in_file);
	printf("record_duration_100ns\t%lld\n", hdr.datarecord_duration);
	printf("start\t%04d-%02d-%02d %02d:%02d:%02d\n", hdr.startdate_year, hdr.startdate_month,
	       hdr.startdate_day, hdr.starttime_hour, hdr.starttime_minute, hdr.starttime_second);
	for (int s = 0; s < hdr.edfsignals; s++) {
		struct edf_param_struct *p = &hdr.signalparam[s];
		printf("signal\t%d\t%s\t%s\t%d\t%lld\t%.10g\t%.10g\t%d\t%d\n", s, p->label, p->physdimension,
		       p->smp_in_datarecord, p->smp_in_file, p->phys_min, p->phys_max, p->dig_min, p->dig_max);
	}
	for (int s = 0; s < hdr.edfsignals; s++) {
		double buf[8];
		int n = edfread_physical_samples(hdr.handle, s, 8, buf);
		for (int k = 0; k < n; k++)
			printf("sample\t%d\t%d\t%.10g\n", s, k, buf[k]);
	}
	for (long long i = 0; i < hdr.annotations_in_file; i++) {
		struct edf_annotation_struct a;
		if (edf_get_annotation(hdr.handle, (int)i, &a) != 0)
			return 1;
		printf("annotation\t%lld\t%lld\t%s\n", a.onset, a.duration_l, a.annotation);
	}
	edfclose_file(hdr.handle);
	return 0;
}
