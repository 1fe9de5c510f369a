#!/bin/sh
#SBATCH --job-name=amplink-run
#SBATCH --cpus-per-task=2
#SBATCH --mem=2G
#SBATCH --time=01:00:00
# One task of the array (submit.sh): the participant on line
# SLURM_ARRAY_TASK_ID of OUT/participants.txt, analysed with amplink run
# --dataset into OUT/sub-<label>/, on the cores the task was given.
#
#   sbatch --array=1-N run-array.sh ROOT RECIPE OUT
#
# --mem must hold the recording's float32 samples (amplink's --max-memory,
# 1 GiB by default, is their limit) and about 100 MB more; raise both for
# long recordings.
set -eu
root=$1
recipe=$2
out=$3
task=${SLURM_ARRAY_TASK_ID:?run-array.sh runs as a task of an array job}
label=$(sed -n "${task}p" "$out/participants.txt")
if [ -z "$label" ]; then
	echo "run-array.sh: $out/participants.txt has no line $task" >&2
	exit 1
fi
exec amplink run --recipe "$recipe" --dataset "$root" --participants "$label" \
	--workers "${SLURM_CPUS_PER_TASK:-1}" --out "$out/sub-$label"
