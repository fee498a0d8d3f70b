#!/usr/bin/env bash
# A parameter sweep as a plain shell loop: the Kestrel Quay balcony slab (an invented
# scenario) with several slab conductivities and facade-insulation conductivities, one
# `fvheat run` per variant into its own folder (without figures, the slowest output), then
# one table of all runs with `fvheat collect`. (`fvheat sweep` does the same in parallel
# and resumably.)
#
# usage: scripts/sweep-example.sh [OUT_DIR] [more fvheat run options...]
#   e.g. scripts/sweep-example.sh /tmp/balcony --set mesh.max_cell=0.1
# environment (optional):
#   SLAB_VALUES        slab conductivities, W/(m·K)             (default "1.6 2.3 2.5")
#   INSULATION_VALUES  facade insulation conductivities, W/(m·K) (default "0.030 0.035 0.040")
#   FVHEAT             the fvheat command                        (default "fvheat")
set -euo pipefail

root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
case_file="$root/cases/balcony_slab.toml"
out="${1:-balcony_sweep_results}"
if [[ $# -gt 0 ]]; then shift; fi
read -r -a fvheat <<< "${FVHEAT:-fvheat}"
read -r -a slab_values <<< "${SLAB_VALUES:-1.6 2.3 2.5}"
read -r -a insulation_values <<< "${INSULATION_VALUES:-0.030 0.035 0.040}"

mkdir -p "$out"
runs=()
for slab in "${slab_values[@]}"; do
    for insulation in "${insulation_values[@]}"; do
        run="$out/slab_${slab}_insulation_${insulation}"
        "${fvheat[@]}" run "$case_file" --quiet --no-plots --out "$run" \
            --set "materials.slab.conductivity=$slab" \
            --set "materials.facade_insulation.conductivity=$insulation" \
            "$@"
        runs+=("$run")
    done
done

"${fvheat[@]}" collect "${runs[@]}" --csv "$out/table.csv"
