#!/usr/bin/env bash
# Build a large Lacuna workspace on a Slurm cluster (run on a login node; it submits two jobs and
# returns at once, printing their ids and how to follow them).
#
#   scripts/slurm-build.sh --workspace DIR [--out DIR] [--shards N] [--cpus N] [--memory SIZE]
#                          [--time T] [--render-time T] [--partition NAME] [--account NAME]
#                          [--logs DIR] [--setup COMMANDS] [--lacuna FILE]
#
#   --workspace DIR   holds audits/*.md and the data, on a file system every node sees   [$WORKSPACE]
#   --out DIR         where the static site is written                     [$OUT or DIR/_site]
#   --shards N        array tasks; more than there are datasets is harmless     [$SHARDS or 16]
#   --cpus N          CPUs per shard, used as its worker threads        [$CPUS_PER_SHARD or 2]
#   --memory SIZE     memory per job in sbatch's units (4G, 500M)          [$MEMORY or not asked]
#   --time T          time limit per shard, e.g. 02:00:00        [$TIME_PER_SHARD or 02:00:00]
#   --render-time T   time limit of the render job                  [$TIME_RENDER or 00:30:00]
#   --partition NAME  partition                         [$PARTITION or the cluster's default]
#   --account NAME    account to charge                       [$ACCOUNT or your default account]
#   --logs DIR        Slurm output files                          [$LOGS or DIR/.lacuna-logs]
#   --setup COMMANDS  run at the start of each job, e.g. 'module load nodejs/20'      [$SETUP]
#   --lacuna FILE     the program     [$LACUNA_BIN or bin/lacuna.mjs of the checkout holding this]
#
# What it asks of the cluster: sbatch and Node.js 20.19 or later on the compute nodes (on PATH, or
# put there by --setup); a file system shared by the login and compute nodes holding the checkout
# and the workspace; per shard --cpus CPUs on one node for --time; for the render job one CPU for
# --render-time; memory only when --memory is given, for each job (otherwise the cluster's default
# per CPU applies). A shard streams its data: the benchmark's builds of 0.4 and 4 GiB peak at
# 160-210 MiB (docs/benchmark.md); rendering the demo's site peaked at 350 MiB; 1G is ample.
#
# 1. A job array of N tasks: task i computes share i+1 of N of the datasets
#    (`lacuna build --shard I/N`) into the workspace's cache, WORKSPACE/.lacuna-cache/. Each
#    dataset goes to exactly one shard (dataset number modulo N), so tasks never compute the same
#    dataset. Shards render nothing. Cache entries are written to a temporary name and renamed
#    into place, so concurrent shards never see half an entry.
# 2. One dependent job (afterok: it starts only when every array task ended with exit code 0) runs
#    a plain `lacuna build`: every dataset comes from the cache, then it versions and renders the
#    site. If a shard fails, Slurm cancels the render job (--kill-on-invalid-dep=yes) rather than
#    leaving it pending: read the shard's log, fix the problem and run this script again; datasets
#    already in the cache are not computed again.
#
# Both jobs are bash scripts (#!/bin/bash) handed to sbatch on its standard input; their settings
# reach them through the environment (--export), so paths with spaces survive.
set -euo pipefail

here=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
WORKSPACE="${WORKSPACE:-}"
OUT="${OUT:-}"
SHARDS="${SHARDS:-16}"
CPUS_PER_SHARD="${CPUS_PER_SHARD:-2}"
MEMORY="${MEMORY:-}"
TIME_PER_SHARD="${TIME_PER_SHARD:-02:00:00}"
TIME_RENDER="${TIME_RENDER:-00:30:00}"
PARTITION="${PARTITION:-}"
ACCOUNT="${ACCOUNT:-}"
LOGS="${LOGS:-}"
SETUP="${SETUP:-}"
LACUNA_BIN="${LACUNA_BIN:-$here/../bin/lacuna.mjs}"

fail() { echo "slurm-build: $1" >&2; exit 2; }
while [[ $# -gt 0 ]]; do
  case $1 in
    -h | --help) sed -n '2,/^# 1\. /p' "$0" | sed '$d' | sed 's/^# \{0,1\}//'; exit 0 ;;
    --workspace | --out | --shards | --cpus | --memory | --time | --render-time | --partition | --account | --logs | --setup | --lacuna)
      [[ $# -ge 2 ]] || fail "$1 needs a value (see --help)"
      case $1 in
        --workspace) WORKSPACE=$2 ;; --out) OUT=$2 ;; --shards) SHARDS=$2 ;; --cpus) CPUS_PER_SHARD=$2 ;;
        --memory) MEMORY=$2 ;; --time) TIME_PER_SHARD=$2 ;; --render-time) TIME_RENDER=$2 ;;
        --partition) PARTITION=$2 ;; --account) ACCOUNT=$2 ;; --logs) LOGS=$2 ;; --setup) SETUP=$2 ;;
        --lacuna) LACUNA_BIN=$2 ;;
      esac
      shift 2 ;;
    *) fail "unknown argument '$1' (see --help)" ;;
  esac
done

[[ -n $WORKSPACE ]] || fail "which workspace? give --workspace DIR (the folder holding audits/)"
[[ -d "$WORKSPACE/audits" ]] || fail "no audits/ folder in the workspace '$WORKSPACE'"
WORKSPACE=$(cd "$WORKSPACE" && pwd)
OUT="${OUT:-$WORKSPACE/_site}"
LOGS="${LOGS:-$WORKSPACE/.lacuna-logs}"
[[ $SHARDS =~ ^[1-9][0-9]*$ ]] || fail "--shards must be a whole number >= 1, got '$SHARDS'"
[[ $CPUS_PER_SHARD =~ ^[1-9][0-9]*$ ]] || fail "--cpus must be a whole number >= 1, got '$CPUS_PER_SHARD'"
[[ -f $LACUNA_BIN ]] || fail "the program '$LACUNA_BIN' does not exist: give --lacuna PATH/bin/lacuna.mjs of a Lacuna checkout on the shared file system"
LACUNA_BIN=$(cd "$(dirname "$LACUNA_BIN")" && pwd)/$(basename "$LACUNA_BIN")
command -v sbatch >/dev/null || fail "sbatch is not on PATH: run this on a login node of the cluster"
mkdir -p "$LOGS" "$(dirname "$OUT")"
OUT=$(cd "$(dirname "$OUT")" && pwd)/$(basename "$OUT")
LOGS=$(cd "$LOGS" && pwd)

common=(--parsable --chdir="$WORKSPACE")
[[ -n $PARTITION ]] && common+=(--partition="$PARTITION")
[[ -n $ACCOUNT ]] && common+=(--account="$ACCOUNT")
[[ -n $MEMORY ]] && common+=(--mem="$MEMORY")

export LACUNA_BIN LACUNA_WS="$WORKSPACE" LACUNA_OUT="$OUT" LACUNA_SHARDS="$SHARDS" \
  LACUNA_WORKERS="$CPUS_PER_SHARD" LACUNA_SETUP="$SETUP"
exports="--export=ALL,LACUNA_BIN,LACUNA_WS,LACUNA_OUT,LACUNA_SHARDS,LACUNA_WORKERS,LACUNA_SETUP"

# 1. The array. Array task ids are 0-based, shards are 1-based. --workers is given explicitly
#    because Node counts the node's cores, not the CPUs Slurm granted.
array_id=$(sbatch "${common[@]}" "$exports" \
  --job-name=lacuna-shard --output="$LOGS/%x-%A_%a.out" --array="0-$((SHARDS - 1))" \
  --cpus-per-task="$CPUS_PER_SHARD" --time="$TIME_PER_SHARD" <<'JOB'
#!/bin/bash
set -eo pipefail
eval "$LACUNA_SETUP"
set -u
node "$LACUNA_BIN" build --workspace "$LACUNA_WS" --shard "$((SLURM_ARRAY_TASK_ID + 1))/$LACUNA_SHARDS" --workers "$LACUNA_WORKERS" --quiet
JOB
)
array_id="${array_id%%;*}" # --parsable prints "jobid" or "jobid;cluster"

# 2. The render, after every array task ended with exit code 0; cancelled if one did not.
render_id=$(sbatch "${common[@]}" "$exports" \
  --job-name=lacuna-render --output="$LOGS/%x-%j.out" \
  --dependency="afterok:$array_id" --kill-on-invalid-dep=yes \
  --cpus-per-task=1 --time="$TIME_RENDER" <<'JOB'
#!/bin/bash
set -eo pipefail
eval "$LACUNA_SETUP"
set -u
node "$LACUNA_BIN" build --workspace "$LACUNA_WS" --out "$LACUNA_OUT" --workers 1
JOB
) || {
  echo "slurm-build: the render job was refused; cancel the shards with: scancel $array_id" >&2
  exit 1
}
render_id="${render_id%%;*}"

memory_text=${MEMORY:-"the cluster's default"}
cat <<EOF
shards: job array $array_id ($SHARDS tasks, $CPUS_PER_SHARD CPUs and $TIME_PER_SHARD each, memory $memory_text)
render: job $render_id (starts when every shard succeeded; cancelled if one fails)
follow:   squeue -j $array_id,$render_id
finished: sacct -j $array_id,$render_id --format=JobID,JobName,State,ExitCode,Elapsed,MaxRSS
logs:     $LOGS
site:     $OUT
EOF
