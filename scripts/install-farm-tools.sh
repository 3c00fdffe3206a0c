#!/usr/bin/env bash
# Installs the farm engines the farm tests use, from Debian's packages, when any is missing:
# GNU parallel, and Slurm (slurm-wlm: slurmctld, slurmd, sbatch) with munge. Called by
# test-all.sh after install-simulators.sh.
set -euo pipefail
missing=()
command -v parallel >/dev/null 2>&1 || missing+=(parallel)
{ command -v slurmctld >/dev/null 2>&1 && command -v slurmd >/dev/null 2>&1 \
  && command -v sbatch >/dev/null 2>&1; } || missing+=(slurm-wlm)
command -v munged >/dev/null 2>&1 || missing+=(munge)
if [ ${#missing[@]} -eq 0 ]; then
  exit 0
fi
echo "installing: ${missing[*]}" >&2
sudo=""
if [ "$(id -u)" != 0 ]; then sudo="sudo"; fi
export DEBIAN_FRONTEND=noninteractive
$sudo apt-get update -q
$sudo apt-get install -y -q "${missing[@]}"
