#!/bin/bash
# A parameter study that outgrows one machine, as a Slurm job array: each task
# runs the 31P notebook headless with another coil limit (`let bmax = ...` in the
# notebook takes the --set value), writing its own executed notebook. Submit
# from the repository root:
#
#   mkdir -p results
#   jid=$(sbatch --parsable notebooks/p31_bmax_array.sh)
#   sbatch --dependency=afterok:$jid --wrap 'nutate run --gather results/p31-bmax-*.ipynb > results/p31-bmax.csv'
#
# The second job gathers every sweep value of the outputs into one CSV table
# (one row per point and quantity, a column for bmax). Each output notebook
# records its --set value and re-runs byte for byte with `nutate run --check`.
#SBATCH --job-name=p31-bmax
#SBATCH --array=0-4
#SBATCH --cpus-per-task=2
#SBATCH --mem=1G
#SBATCH --time=00:30:00
#SBATCH --output=results/p31-bmax-%a.log
set -euo pipefail

values=("15 uT" "20 uT" "25 uT" "30 uT" "35 uT")
bmax=${values[$SLURM_ARRAY_TASK_ID]}
nutate run --set "bmax=$bmax" \
  --output "results/p31-bmax-${SLURM_ARRAY_TASK_ID}.ipynb" \
  notebooks/p31_excitation_7T.ipynb
