#!/usr/bin/env bash
# compare_revisions.sh OLD [NEW]: runs the demo recipe on every input form of
# the demo (epochs CSV, float32 epochs, continuous CSV, EDF+, WAV) with the
# amplink of two revisions (NEW defaults to the working tree) and compares
# every output file byte for byte: results.csv, results.json, recipe.json,
# figures/*.svg and maps/*.csv. Exit status 0 when all are identical.
#
# For changes meant to leave behaviour alone (moves, reshaping, speed):
#   testdata/regress/compare_revisions.sh HEAD~1
set -euo pipefail
old=$1
new=${2:-}
root=$(git rev-parse --show-toplevel)
work=$(mktemp -d)
trap 'git -C "$root" worktree remove --force "$work/old-tree" >/dev/null 2>&1 || true; rm -rf "$work"' EXIT

git -C "$root" worktree add --detach -q "$work/old-tree" "$old"
(cd "$work/old-tree" && go build -o "$work/amplink-old" ./cmd/amplink)
if [ -n "$new" ]; then
	git -C "$root" worktree add --detach -q "$work/new-tree" "$new"
	(cd "$work/new-tree" && go build -o "$work/amplink-new" ./cmd/amplink)
	git -C "$root" worktree remove --force "$work/new-tree"
else
	(cd "$root" && go build -o "$work/amplink-new" ./cmd/amplink)
fi

"$work/amplink-new" demo --out "$work/demo" >/dev/null
status=0
for input in demo_epochs.csv demo_epochs.f32 demo_continuous.csv demo_edf.edf demo_wav.wav; do
	for v in old new; do
		(cd "$work/demo" && "$work/amplink-$v" run --recipe recipe.json --out "$work/out-$v-$input" "$input" >/dev/null 2>"$work/err-$v-$input")
	done
	if diff -r "$work/out-old-$input" "$work/out-new-$input" >/dev/null; then
		echo "same: $input ($(find "$work/out-new-$input" -type f | wc -l) files)"
	else
		echo "DIFFERENT: $input"
		diff -rq "$work/out-old-$input" "$work/out-new-$input" || true
		status=1
	fi
	if ! diff -q "$work/err-old-$input" "$work/err-new-$input" >/dev/null; then
		echo "different messages: $input"
		diff "$work/err-old-$input" "$work/err-new-$input" || true
		status=1
	fi
done
exit $status
