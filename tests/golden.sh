# Records what a build of embz prints, so that a restructuring can be checked to change no
# output byte:
#     bash tests/golden.sh DIR path/to/embz      record into DIR (made anew)
#     diff -r DIR_BEFORE DIR_AFTER               compare two builds
# Recorded: every embz call made by the command-line test scripts (tests/test_*.sh), the tour
# of the README and the demo. Each call gets a file with its arguments, exit code, standard
# output, standard error and any file it wrote with -o. Lines that name elapsed time are
# replaced by a fixed word (they differ from run to run), and so are the engine's series and
# integral counts (with two threads they depend on which thread takes which size); nothing
# else is filtered.
# Not a test of the suite (the outputs are not kept in the repository): run it on demand.
set -u
DIR=${1:?usage: golden.sh DIR path/to/embz}
BIN=$(readlink -f "${2:?usage: golden.sh DIR path/to/embz}")
SRC=$(cd "$(dirname "$0")/.." && pwd)
rm -rf "$DIR"
mkdir -p "$DIR"
chmod 777 "$DIR"             # a test runs embz as an unprivileged user
DIR=$(readlink -f "$DIR")
export EMBZ_FAMILY_PATH="$SRC/families"
export OMP_NUM_THREADS=1     # work counters in details depend on how sizes meet threads

# The recording wrapper: called instead of embz.
WRAP="$DIR/.wrap"
cat >"$WRAP" <<EOF
#!/bin/bash
umask 000
dir="$DIR"
n=\$(( \$(cat "\$dir/.count" 2>/dev/null || echo 0) + 1 ))
echo \$n >"\$dir/.count"
rec="\$dir/\$(cat "\$dir/.script")/\$(printf '%05d' \$n)"
mkdir -p "\$(dirname "\$rec")"
"$BIN" "\$@" >"\$rec.out" 2>"\$rec.err"
rc=\$?
# a file written with -o / --output / --out
prev=""
for a in "\$@"; do
  case "\$prev" in
    -o|--output|--out)
      if [ -f "\$a" ]; then
        case "\$a" in
          *.pdf) pdftotext -layout "\$a" "\$rec.file" 2>/dev/null || cp "\$a" "\$rec.file" ;;
          *) cp "\$a" "\$rec.file" ;;
        esac
      fi ;;
  esac
  prev="\$a"
done
{ printf 'args:'; printf ' [%s]' "\$@"; printf '\nexit: %d\n' \$rc; } >"\$rec.call"
cat "\$rec.out"
cat "\$rec.err" >&2
exit \$rc
EOF
chmod +x "$WRAP"

for t in "$SRC"/tests/test_*.sh; do
  name=$(basename "$t" .sh)
  # test_install builds no output of embz; test_output checks signals and full disks, which
  # the recording wrapper changes
  case "$name" in test_install|test_output) continue ;; esac
  echo "$name" >"$DIR/.script"
  echo "0" >"$DIR/.count"
  (cd "$DIR" && bash "$t" "$WRAP" >"$DIR/$name.log" 2>&1)
done

# the README tour and the demo, in a scratch folder
echo "tour" >"$DIR/.script"
echo "0" >"$DIR/.count"
work=$(mktemp -d)
(
  cd "$work"
  grep -E '^    embz ' "$SRC/README.md" | sed -e 's/^    embz //' -e 's/ *#.*$//' |
  while read -r line; do
    eval "set -- $line"
    "$WRAP" "$@" >/dev/null 2>&1 </dev/null
  done
)
rm -rf "$work"

# elapsed times differ from run to run
find "$DIR" -type f \( -name '*.out' -o -name '*.err' -o -name '*.file' -o -name '*.log' \) |
while read -r f; do
  if grep -Iq . "$f" 2>/dev/null; then
    sed -E -i -e 's/[0-9]+(\.[0-9]+)? ?(s|ms|seconds?)\b/TIME/g' \
              -e 's/"seconds": *[0-9.eE+-]+/"seconds": TIME/g' \
              -e 's/[0-9]{4}-[0-9]{2}-[0-9]{2}[ T][0-9:]{5,8}/DATE/g' \
              -e 's/[0-9]+ series, [0-9]+ integrals/N series, N integrals/g' \
              -e 's#,[0-9]+\.[0-9]+,"(analytic|explicit|skipped)#,TIME,"\1#g' \
              -e 's#/tmp/[A-Za-z0-9_.-]*[.-][A-Za-z0-9]{6,10}\b#TMPDIR#g' "$f"
  fi
done
find "$DIR" -type f -name '*.call' -exec sed -E -i 's#/tmp/[A-Za-z0-9_.-]*[.-][A-Za-z0-9]{6,10}\b#TMPDIR#g' {} +
rm -f "$DIR/.count" "$DIR/.script" "$WRAP"
echo "recorded $(find "$DIR" -name '*.call' | wc -l) calls in $DIR"
