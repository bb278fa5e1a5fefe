#!/bin/bash
# Render samples/plan.toml as a Slurm job array: task K of N renders the K-th
# contiguous block of frames. With --shard auto, skyframe reads SLURM_ARRAY_TASK_ID and
# SLURM_ARRAY_TASK_COUNT (with SLURM_ARRAY_TASK_MIN/STEP) itself, so the
# array size is the only place N is given. Frames go to a shared file system;
# each file is written atomically, and --resume makes a requeued task skip the
# frames it already finished.
#
#   sbatch samples/slurm-array.sh
#   # afterwards, check the whole sequence (also runs the flash check):
#   skyframe flight samples/plan.toml --verify
#
#SBATCH --job-name=skyframe-flight
#SBATCH --array=0-7
#SBATCH --cpus-per-task=2
#SBATCH --mem=1G
#SBATCH --time=01:00:00
#SBATCH --output=skyframe-%A_%a.log
#SBATCH --requeue

set -euo pipefail
srun skyframe flight samples/plan.toml --shard auto --resume --workers "${SLURM_CPUS_PER_TASK:-0}"
