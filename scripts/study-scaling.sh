#!/usr/bin/env bash
# How a design study's rate scales from one worker to two, on threads and
# over MPI processes (docs/performance.md section 6). Runs the demo study,
# enlarged to SAMPLES samples, in four configurations one after the other,
# ROUNDS times, and prints samples per second for each run, the median of
# each configuration and of each round's two-against-one ratio, and whether
# the summaries of all configurations are identical.
#
#   scripts/study-scaling.sh [BUILD_DIR] [ROUNDS] [SAMPLES]
#
# Defaults: build, 5 rounds, 20000 samples. Needs BUILD_DIR/kinloop and, for
# the MPI rows, BUILD_DIR/kinloop-study-mpi with mpirun on PATH.
set -euo pipefail
build=${1:-build}
rounds=${2:-5}
samples=${3:-20000}
here=$(cd "$(dirname "$0")/.." && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT

cp "$here/examples/models/flap-tucker.kinloop" "$work/"
sed "s/^samples .*/samples $samples/" "$here/examples/models/flap-tucker.study" \
  >"$work/scale.study"

have_mpi=0
if [[ -x "$build/kinloop-study-mpi" ]] && command -v mpirun >/dev/null; then
  have_mpi=1
fi

# one run: prints its samples per second; its summary (without the
# throughput line, which differs run to run) goes to $work/summary.NAME
run() {
  local name=$1
  shift
  "$@" >"$work/out" 2>/dev/null
  grep -v '^throughput' "$work/out" >"$work/summary.$name"
  awk '/^throughput/ { for (i = 2; i <= NF; i++) if ($i == "samples/s,") { print $(i - 1); exit } }' \
    "$work/out"
}

# Open MPI's isolated launcher needs no ssh; root may run it (CI machines)
mpi() {
  OMPI_MCA_plm=isolated mpirun --oversubscribe --allow-run-as-root -np "$1" \
    "$build/kinloop-study-mpi" "$work/scale.study"
}

median() { sort -g | awk '{ v[NR] = $1 } END { print (NR % 2) ? v[(NR + 1) / 2] : (v[NR / 2] + v[NR / 2 + 1]) / 2 }'; }

: >"$work/t1"; : >"$work/t2"; : >"$work/p1"; : >"$work/p2"; : >"$work/rt"; : >"$work/rp"
echo "round  1 thread  2 threads  ratio   1 process  2 processes  ratio   (samples/s)"
for ((r = 1; r <= rounds; r++)); do
  t1=$(run t1 "$build/kinloop" study "$work/scale.study" --threads 1)
  t2=$(run t2 "$build/kinloop" study "$work/scale.study" --threads 2)
  rt=$(awk -v a="$t2" -v b="$t1" 'BEGIN { printf "%.2f", a / b }')
  echo "$t1" >>"$work/t1"; echo "$t2" >>"$work/t2"; echo "$rt" >>"$work/rt"
  line=$(printf "%5d  %8s  %9s  %5s" "$r" "$t1" "$t2" "$rt")
  if ((have_mpi)); then
    p1=$(run p1 mpi 1)
    p2=$(run p2 mpi 2)
    rp=$(awk -v a="$p2" -v b="$p1" 'BEGIN { printf "%.2f", a / b }')
    echo "$p1" >>"$work/p1"; echo "$p2" >>"$work/p2"; echo "$rp" >>"$work/rp"
    line+=$(printf "   %9s  %11s  %5s" "$p1" "$p2" "$rp")
  fi
  echo "$line"
done
line=$(printf "median %8s  %9s  %5s" "$(median <"$work/t1")" "$(median <"$work/t2")" \
  "$(median <"$work/rt")")
if ((have_mpi)); then
  line+=$(printf "   %9s  %11s  %5s" "$(median <"$work/p1")" "$(median <"$work/p2")" \
    "$(median <"$work/rp")")
fi
echo "$line"

same=yes
for name in t2 p1 p2; do
  [[ -f "$work/summary.$name" ]] || continue
  cmp -s "$work/summary.t1" "$work/summary.$name" || same=no
done
echo "summaries identical across configurations: $same"
