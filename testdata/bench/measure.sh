#!/bin/sh
# Whole-process wall time and peak RSS (medians of REPS runs, interleaved) of
# `amplink run` and testdata/bench/compare_numpy.py on the standard workload,
# plus the 10-minute envelope run and, with LONG=1, the 1-hour 64-channel run.
#
#   go build -o /tmp/amplink ./cmd/amplink
#   go run ./cmd/amplink-workload --out /tmp/wl --envelope [--long]
#   sh testdata/bench/measure.sh /tmp/wl            # REPS=3 LONG=0 by default
#
# AMPLINK names the binary (default /tmp/amplink). The table gives CPU time
# (user + sys) beside wall time: on a shared machine it is the steadier figure.
#
# Needs GNU time (/usr/bin/time) and /usr/bin/python3 with numpy and scipy.
set -eu
dir=${1:?usage: measure.sh WORKLOAD_DIR}
reps=${REPS:-3}
long=${LONG:-0}
bin=${AMPLINK:-/tmp/amplink}
here=$(cd "$(dirname "$0")" && pwd)
py="/usr/bin/python3 $here/compare_numpy.py $dir"
log=$(mktemp)
trap 'rm -f "$log"' EXIT

# measure NAME CMD...: one run, appended to $log as "NAME wall_s rss_kB user_s sys_s".
measure() {
	name=$1
	shift
	/usr/bin/time -f "$name %e %M %U %S" -a -o "$log" "$@" >/dev/null 2>&1 || {
		echo "measure.sh: $name failed: $*" >&2
		exit 1
	}
}

echo "load before: $(cut -d' ' -f1-3 /proc/loadavg)"
i=0
while [ "$i" -lt "$reps" ]; do
	measure native "$bin" run --recipe "$dir/recipe.json" --out "$dir/out-native" "$dir/workload.f32"
	measure numpy $py --out "$dir/numpy_results.csv"
	measure native-w1 "$bin" run --workers 1 --recipe "$dir/recipe.json" --out "$dir/out-w1" "$dir/workload.f32"
	measure native-w2 "$bin" run --workers 2 --recipe "$dir/recipe.json" --out "$dir/out-w2" "$dir/workload.f32"
	measure numpy-w1 $py --workers 1 --out "$dir/numpy_results_w1.csv"
	if [ -f "$dir/recipe-figures.json" ]; then
		measure native-figures "$bin" run --recipe "$dir/recipe-figures.json" --out "$dir/out-figures" "$dir/workload.f32"
	fi
	if [ -f "$dir/envelope.edf" ]; then
		measure envelope-10min "$bin" run --recipe "$dir/envelope-recipe.json" --out "$dir/out-envelope" "$dir/envelope.edf"
	fi
	if [ "$long" = 1 ] && [ -f "$dir/long.edf" ]; then
		measure long-1h "$bin" run --recipe "$dir/long-recipe.json" --out "$dir/out-long" "$dir/long.edf"
	fi
	i=$((i + 1))
done
echo "load after:  $(cut -d' ' -f1-3 /proc/loadavg)"
$py --out "$dir/numpy_results.csv" --check "$dir/out-native/results.csv" 2>/dev/null
cmp -s "$dir/out-w1/results.csv" "$dir/out-w2/results.csv" && echo "results.csv: --workers 1 and 2 byte-identical" ||
	echo "results.csv: --workers 1 and 2 DIFFER"

echo
echo "| run | wall s (median of $reps) | wall s, all runs | CPU s (user+sys, median) | peak RSS MB (median) |"
echo "|---|---|---|---|---|"
median() { sort -n | awk '{ v[NR] = $1 } END { print v[int((NR + 1) / 2)] }'; }
for name in $(cut -d' ' -f1 "$log" | awk '!seen[$0]++'); do
	wall=$(grep "^$name " "$log" | cut -d' ' -f2 | median)
	all=$(grep "^$name " "$log" | cut -d' ' -f2 | tr '\n' ' ' | sed 's/ $//')
	rss=$(grep "^$name " "$log" | cut -d' ' -f3 | median)
	cpu=$(grep "^$name " "$log" | awk '{ printf "%.2f\n", $4 + $5 }' | median)
	echo "| $name | $wall | $all | $cpu | $((rss / 1024)) |"
done
