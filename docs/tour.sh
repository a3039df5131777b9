#!/usr/bin/env bash
# Runs every command of the README's tour, writing the figures into the
# folder given as the first argument (default docs/figures). CI runs it into a
# scratch folder and checks that the figures equal the committed ones.
set -euo pipefail
cd "$(dirname "$0")/.."
out=${1:-docs/figures}
mkdir -p "$out"
cw=target/release/chainwell
[ -x "$cw" ] || cargo build --release --quiet

$cw solve potentials/ideal_box.toml --plot "$out/box_states.svg"
$cw solve potentials/alternating_chain.toml --levels 3,4,5,6,7,8,9 --plot "$out/chain_states.svg"
$cw solve potentials/alternating_chain.toml --figure spectrum --plot "$out/chain_spectrum.svg"
$cw sweep potentials/alternating_chain.toml --vary chain.bonds=3:31:2 --plot "$out/chain_sweep.svg"
$cw fit potentials/alternating_chain.toml --data potentials/demo_series.csv \
    --free chain.alternation,chain.end_extension --set grid.spacing=0.05 --plot "$out/fit.svg"
$cw bands potentials/polymer_cell.toml --finite 5:41:4 --energy-window -1:12 --plot "$out/bands.svg"
$cw converge potentials/harmonic_well.toml --set grid.points=400 --plot "$out/converge.svg"
$cw sweep potentials/streptocyanines.toml --vary chain.bonds=4:12:2 --set chain.end_extension=1.53 \
    --set chain.bond_length=1.266 --data potentials/streptocyanines.csv --plot "$out/cyanines.svg"
$cw sweep potentials/polyenes.toml --vary chain.bonds=3:21:2 --set chain.alternation=2.46 \
    --data potentials/polyenes.csv --plot "$out/polyenes.svg"
