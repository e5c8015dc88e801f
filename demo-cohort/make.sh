#!/bin/sh
# Regenerates the invented demo cohort in this folder from the simulator.
# Run from anywhere: sh demo-cohort/make.sh. The same seed writes byte-identical
# files; README.md and this script are kept, the cohort files are replaced.
set -eu
cd "$(dirname "$0")/.."
npm run build
node bin/plexus.js simulate --out demo-cohort --seed 2026 \
  --regions 60 --patients 30 --controls 30 --kind correlation \
  --effect-regions 6 --effect-size 1.2 --format tsv --force
