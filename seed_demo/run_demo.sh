#!/usr/bin/env bash
# Build a fresh demo registry from seed_demo/ and walk through the main commands.
set -euo pipefail
cd "$(dirname "$0")/.."
rm -rf demo_out  # every run starts from nothing (the backup step refuses to overwrite)
mkdir -p demo_out
export FLUXLEDGER_DB="$PWD/demo_out/demo.sqlite"
export FLUXLEDGER_USER="demo"
step() { echo; echo "\$ fluxledger $*"; fluxledger "$@"; }
# a step whose exit status 1 means "findings in the data" (expected for the planted slips)
step_findings() { echo; echo "\$ fluxledger $*"; fluxledger "$@" || [ $? -eq 1 ]; }

step init
# --- import step ---
step import seed_demo/halvorsen_barriers.xlsx
step import seed_demo/literature_barriers.csv
step import seed_demo/halvorsen_barriers.xlsx   # the same file again: nothing added
step add --method coalescence --compound DEMO-ADD-1 --name "N,N-dimethylacetamide" \
  --smiles "CC(=O)N(C)C" --process bond-rotation --nucleus 1H --solvent toluene-d8 --mhz 400 \
  --tc "70 ± 1 °C" --dnu "0.12 ppm" --dg "17.0 kcal/mol" --reference "demo: invented value"
# --- check step ---
step_findings check --severity warning
first_error=$(fluxledger check --json --severity error 2>/dev/null \
  | python -c 'import json, sys; f = json.load(sys.stdin); print(f[0]["id"] if f else "")' || true)
if [ -n "$first_error" ]; then
  step accept "$first_error" --reason "demo: confirmed against the original spectra"
fi
step_findings check --new
# --- find step ---
step find --motif amide --barrier ">= 60 kJ/mol"
step find --motif biaryl-ortho --solvent nonpolar --barrier ">= 90 kJ/mol" --sort -barrier
step motifs show amide
step list --limit 10
step show 1
# --- calc step ---
step calc coalescence --tc "-12 ± 1 °C" --dnu "0.045 ppm" --mhz 600
step calc plan --dg "21 kcal/mol" --dnu "0.15 ppm" --mhz 60 --mhz 400 --solvent-bp "111 °C"
# --- history, pictures, safety ---
step --as demo-reviewer edit 41 --set status=reviewed --reason "demo: checked against the spectra"
step history 41
step plot eyring 25 -o demo_out/eyring-25.png
step report -o demo_out/registry-view
step export -o demo_out/barriers.tex --energy-unit kcal/mol
step backup demo_out/backup.sqlite
step verify
step info
