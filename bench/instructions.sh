# Instruction counts of the analytic engine at the benchmark's sizes (10^30, 10^100, 10^1000,
# one ebit), for one build or two side by side, counted by valgrind's callgrind tool: unlike
# wall time they do not depend on the machine's load, so a restructuring can be held to a
# budget ("no more than 5 % more instructions").
#     bash bench/instructions.sh path/to/embz [path/to/other/embz]
# Also one target vector, (0.7, 0.3), at 10^30. Prints one line per family and size: the counts and, for two builds, their ratio.
set -u
A=${1:?usage: instructions.sh EMBZ [EMBZ_OTHER]}
B=${2:-}
SRC=$(cd "$(dirname "$0")/.." && pwd)
export EMBZ_FAMILY_PATH="$SRC/families" OMP_NUM_THREADS=1
count() {  # count BINARY ARGS...: instructions of one run
    local bin=$1; shift
    valgrind --tool=callgrind --callgrind-out-file=/dev/null "$bin" "$@" 2>&1 >/dev/null |
        sed -n 's/.*Collected : \([0-9]*\).*/\1/p'
}
printf '%-10s %-8s %-8s %16s' family n target "instructions"
[ -n "$B" ] && printf ' %16s %8s' "other" "ratio"
printf '\n'
row() {  # row FAMILY N [TARGET]
  local fam=$1 n=$2 t=${3:-}
  local args=(error "$fam" -n "$n")
  [ -n "$t" ] && args+=(--target "$t")
  a=$(count "$A" "${args[@]}")
  printf '%-10s %-8s %-8s %16s' "$fam" "$n" "${t:-ebit}" "$a"
  if [ -n "$B" ]; then
      b=$(count "$B" "${args[@]}")
      printf ' %16s %8s' "$b" "$(awk -v a="$a" -v b="$b" 'BEGIN { printf "%.4f", b / a }')"
  fi
  printf '\n'
}
for fam in ${EMBZ_BENCH_FAMILIES:-inverse power logpower nearmiss}; do
  for n in 10^30 10^100 10^1000; do row "$fam" "$n"; done
  row "$fam" 10^30 0.7,0.3       # a target vector: the threshold search
done
