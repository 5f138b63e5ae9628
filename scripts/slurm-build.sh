#!/usr/bin/env bash
# Build a large Lacuna workspace on a Slurm cluster.
#
#   scripts/slurm-build.sh            (run on a login node; it submits two jobs and returns)
#
# 1. A job array of SHARDS tasks: task i computes share i+1 of SHARDS of the datasets
#    (`lacuna build --shard I/N`) into the workspace's cache, WORKSPACE/.lacuna-cache/. Each
#    dataset goes to exactly one shard (dataset number modulo N), so tasks never compute the
#    same dataset. Shards render nothing.
# 2. One dependent job (afterok: it starts only when every array task succeeded) runs a plain
#    `lacuna build`: every dataset comes from the cache, then it versions and renders the site.
#
# The workspace must be on a file system that every node sees (cache entries are written to a
# temporary name and renamed into place, so concurrent shards never see half an entry). If a
# shard fails, the render job never starts: fix the problem and run this script again; datasets
# already in the cache are not computed again.
set -euo pipefail

# ---- settings: edit these ---------------------------------------------------------------------
LACUNA_REPO="${LACUNA_REPO:-$HOME/lacuna}"          # checkout of Lacuna (holds bin/lacuna.mjs)
WORKSPACE="${WORKSPACE:-$PWD/workspace}"            # holds audits/*.md and the data
OUT="${OUT:-$WORKSPACE/_site}"                      # where the static site is written
SHARDS="${SHARDS:-16}"                              # array tasks; more than datasets is harmless
CPUS_PER_SHARD="${CPUS_PER_SHARD:-2}"               # worker threads per shard (passed as --workers)
MEM_PER_SHARD="${MEM_PER_SHARD:-4G}"                # a shard streams its data: memory stays small
TIME_PER_SHARD="${TIME_PER_SHARD:-02:00:00}"
TIME_RENDER="${TIME_RENDER:-00:30:00}"
PARTITION="${PARTITION:-}"                          # empty: the cluster's default partition
ACCOUNT="${ACCOUNT:-}"                              # empty: your default account
LOGS="${LOGS:-$WORKSPACE/.lacuna-logs}"             # Slurm output files
# Commands run at the start of every job, e.g. to put Node.js 20 or later on PATH.
SETUP="${SETUP:-}"                                  # e.g. SETUP='module load nodejs/20'
# -----------------------------------------------------------------------------------------------

if ! [[ "$SHARDS" =~ ^[1-9][0-9]*$ ]]; then
  echo "SHARDS must be a whole number >= 1, got '$SHARDS'" >&2
  exit 2
fi
if [[ ! -d "$WORKSPACE/audits" ]]; then
  echo "no audits/ folder in WORKSPACE=$WORKSPACE" >&2
  exit 2
fi
mkdir -p "$LOGS"

common=(--parsable)
[[ -n "$PARTITION" ]] && common+=(--partition="$PARTITION")
[[ -n "$ACCOUNT" ]] && common+=(--account="$ACCOUNT")

# The job scripts read these from their environment (--export), so paths with spaces survive.
export LACUNA_BIN="$LACUNA_REPO/bin/lacuna.mjs" LACUNA_WS="$WORKSPACE" LACUNA_OUT="$OUT" \
  LACUNA_SHARDS="$SHARDS" LACUNA_WORKERS="$CPUS_PER_SHARD" LACUNA_SETUP="$SETUP"
exports="--export=ALL,LACUNA_BIN,LACUNA_WS,LACUNA_OUT,LACUNA_SHARDS,LACUNA_WORKERS,LACUNA_SETUP"

# 1. The array. Single quotes: $SLURM_ARRAY_TASK_ID and the LACUNA_* variables expand when the
#    task runs, not here. Array task ids are 0-based, shards are 1-based. --workers is given
#    explicitly because Node counts the node's cores, not the cores Slurm granted.
# shellcheck disable=SC2016
array_id=$(sbatch "${common[@]}" "$exports" \
  --job-name=lacuna-shard --output="$LOGS/%x-%A_%a.out" \
  --array="0-$((SHARDS - 1))" \
  --cpus-per-task="$CPUS_PER_SHARD" --mem="$MEM_PER_SHARD" --time="$TIME_PER_SHARD" \
  --wrap='set -euo pipefail; eval "$LACUNA_SETUP"
node "$LACUNA_BIN" build --workspace "$LACUNA_WS" --shard "$((SLURM_ARRAY_TASK_ID + 1))/$LACUNA_SHARDS" --workers "$LACUNA_WORKERS" --quiet')
array_id="${array_id%%;*}" # --parsable prints "jobid" or "jobid;cluster"

# 2. The render, after every array task ended with exit code 0.
# shellcheck disable=SC2016
render_id=$(sbatch "${common[@]}" "$exports" \
  --job-name=lacuna-render --output="$LOGS/%x-%j.out" \
  --dependency="afterok:$array_id" \
  --cpus-per-task=1 --mem=4G --time="$TIME_RENDER" \
  --wrap='set -euo pipefail; eval "$LACUNA_SETUP"
node "$LACUNA_BIN" build --workspace "$LACUNA_WS" --out "$LACUNA_OUT" --workers 1')
render_id="${render_id%%;*}"

echo "submitted shards: job array $array_id ($SHARDS tasks); render: job $render_id (after all shards succeed)"
echo "logs in $LOGS; the site will be in $OUT"
