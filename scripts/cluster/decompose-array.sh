#!/usr/bin/env bash
# Example: decompose many runs on a cluster with one array task per run (SLURM syntax; adapt the
# #SBATCH lines to your scheduler). Each task runs the same code as Quorum's worker, needs no
# database, and writes one output folder per run.
#
#   ls /data/study/sub-*/func/*_bold.nii.gz > runs.txt
#   sbatch --array=1-$(wc -l < runs.txt) scripts/cluster/decompose-array.sh runs.txt /scratch/decompositions
#
#SBATCH --job-name=quorum-decompose
#SBATCH --cpus-per-task=2
#SBATCH --mem=4G
#SBATCH --time=00:30:00
set -euo pipefail
LIST="${1:?give the file listing one run per line}"
OUT="${2:?give the output folder}"
RUN="$(sed -n "${SLURM_ARRAY_TASK_ID:?not inside an array job}p" "$LIST")"
NAME="$(basename "$RUN" .nii.gz)"
MOTION="${RUN%_bold.nii.gz}_desc-motion_timeseries.tsv"
ARGS=(decompose "$RUN" --out "$OUT/$NAME" --drop "${QUORUM_DROP:-4}" --seed "${QUORUM_SEED:-1}")
[ -f "$MOTION" ] && ARGS+=(--motion "$MOTION")
cd "${QUORUM_HOME:?set QUORUM_HOME to a Quorum checkout with npm ci done}"
npm run -s quorum -- "${ARGS[@]}" > "$OUT/$NAME.summary.json"
