#!/usr/bin/env bash
# Wall time of a 24-variant sweep of the balcony case (default mesh): 4 slab conductivities
# × 3 facade-insulation conductivities × with/without the thermal-break module, once with
# one worker process and once with two. Prints one line per run; no pass/fail threshold.
#
# usage: scripts/sweep-timing.sh [WORK_DIR] [more fvheat sweep options...]
set -euo pipefail

root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
work="${1:-$(mktemp -d)}"
if [[ $# -gt 0 ]]; then shift; fi
read -r -a fvheat <<< "${FVHEAT:-fvheat}"

for jobs in 1 2; do
    out="$work/jobs$jobs"
    rm -rf "$out"
    start=$(date +%s%N)
    "${fvheat[@]}" sweep "$root/cases/balcony_slab.toml" --out "$out" --jobs "$jobs" --quiet \
        --vary materials.slab.conductivity=1.6,2.0,2.3,2.5 \
        --vary materials.facade_insulation.conductivity=0.030,0.035,0.040 \
        --vary regions.3.material=slab,thermal_break "$@"
    end=$(date +%s%N)
    ms=$(((end - start) / 1000000))
    printf 'jobs %d: 24 variants in %d.%01d s\n' "$jobs" $((ms / 1000)) $((ms % 1000 / 100))
done
