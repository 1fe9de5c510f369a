#!/bin/sh
#SBATCH --job-name=amplink-merge
#SBATCH --mem=1G
#SBATCH --time=00:30:00
# After the array (submit.sh): merges the tables the tasks wrote into
# OUT/group.csv, with the group figures in OUT/group-figures/. With
# GROUP_COLUMN, the two groups of that participants.tsv column are compared.
#
#   sbatch --dependency=afterany:JOB merge.sh ROOT OUT [GROUP_COLUMN]
#
# A task that failed wrote no results.csv (its log says why); the merge
# takes the others and says how many are missing.
set -eu
root=$1
out=$2
column=${3:-}
set -- "$out"/sub-*/results.csv
if [ ! -f "$1" ]; then
	echo "merge.sh: no results.csv under $out" >&2
	exit 1
fi
want=$(wc -l <"$out/participants.txt")
if [ "$#" -ne "$want" ]; then
	echo "merge.sh: $# of $want participants have a table; see $out/logs for the others" >&2
fi
if [ -z "$column" ]; then
	exec amplink merge --out "$out/group.csv" --figures "$out/group-figures" "$@"
fi
# recording,group: a BIDS recording's file name starts with its
# participant_id and an underscore (EDF and BDF recordings here).
{
	echo recording,group
	find "$root" -path "$root/sub-*" -type f \( -name '*_eeg.edf' -o -name '*_eeg.bdf' \
		-o -name '*_meg.edf' -o -name '*_meg.bdf' -o -name '*_ieeg.edf' -o -name '*_ieeg.bdf' \) |
		LC_ALL=C sort |
		awk -F'\t' -v col="$column" '
			FNR == NR { sub(/\r$/, "") }
			FNR == NR && FNR == 1 { for (i = 1; i <= NF; i++) { if ($i == "participant_id") p = i; if ($i == col) c = i }; next }
			FNR == NR { if ($c != "" && $c != "n/a") g[$p] = $c; next }
			{ n = $0; sub(/.*\//, "", n); id = n; sub(/_.*/, "", id); if (id in g) print n "," g[id] }' \
			"$root/participants.tsv" -
} >"$out/groups.csv"
exec amplink merge --out "$out/group.csv" --groups "$out/groups.csv" --figures "$out/group-figures" "$@"
