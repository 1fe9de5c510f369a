#!/bin/sh
# Submits a BIDS study to Slurm as an array job: one task per participant
# runs amplink run (run-array.sh), then one job merges the tables once every
# task has ended (merge.sh).
#
#   sh submit.sh ROOT RECIPE OUT [GROUP_COLUMN]
#
# ROOT is the dataset, RECIPE the recipe, OUT the folder the tables, logs and
# merged table go to (on a file system every node sees). GROUP_COLUMN names
# the participants.tsv column whose two values are the groups to compare;
# participants without a value there (n/a or empty) are left out, as
# amplink run --dataset --group-column leaves them out. At most 50 tasks run
# at once (the %50); change it to suit your cluster.
set -eu
usage="usage: submit.sh ROOT RECIPE OUT [GROUP_COLUMN]"
root=${1:?$usage}
recipe=${2:?$usage}
out=${3:?$usage}
column=${4:-}
here=$(cd "$(dirname "$0")" && pwd)
mkdir -p "$out/logs"

# The participants to run, one label a line: the dataset's sub-* folders,
# and with GROUP_COLUMN only those with a group.
find "$root" -mindepth 1 -maxdepth 1 -type d -name 'sub-*' | sed 's|.*/sub-||' | LC_ALL=C sort >"$out/participants.txt"
if [ -n "$column" ]; then
	awk -F'\t' -v col="$column" '
		{ sub(/\r$/, "") }
		FNR == NR && FNR == 1 {
			for (i = 1; i <= NF; i++) { if ($i == "participant_id") p = i; if ($i == col) c = i }
			if (!p || !c) { print "submit.sh: participants.tsv has no participant_id or " col " column" > "/dev/stderr"; exit 1 }
			next
		}
		FNR == NR { if ($c != "" && $c != "n/a") { id = $p; sub(/^sub-/, "", id); ok[id] = 1 }; next }
		$0 in ok' "$root/participants.tsv" "$out/participants.txt" >"$out/participants.tmp"
	mv "$out/participants.tmp" "$out/participants.txt"
fi
n=$(wc -l <"$out/participants.txt")
if [ "$n" -eq 0 ]; then
	echo "submit.sh: no participant to run in $root" >&2
	exit 1
fi

# --parsable prints "jobid" or "jobid;cluster".
runs=$(sbatch --parsable --array="1-$n%50" --output="$out/logs/run-%A_%a.log" \
	"$here/run-array.sh" "$root" "$recipe" "$out")
merge=$(sbatch --parsable --dependency="afterany:${runs%%;*}" --output="$out/logs/merge-%j.log" \
	"$here/merge.sh" "$root" "$out" ${column:+"$column"})
echo "submitted $n array tasks as job ${runs%%;*} and the merge as job ${merge%%;*}"
