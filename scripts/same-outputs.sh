#!/usr/bin/env bash
# Compares two folders written by scripts/demo-outputs.sh, byte for byte, after masking what
# must differ between two runs: run times, generation times and the version string. Exit 0 when the same, 1 with the differences otherwise.
#   scripts/same-outputs.sh BEFORE AFTER
set -uo pipefail
a=$(realpath "$1")
b=$(realpath "$2")
mask() {
  sed -E \
    -e 's/[0-9]{4}-[0-9]{2}-[0-9]{2}T[0-9:.]+Z?/TIME/g' \
    -e 's/(in |took |elapsed |"seconds": |run_seconds": )[0-9.]+ ?m?s/\1SECS/g' \
    -e 's/neckline [0-9]+\.[0-9]+\.[0-9]+/neckline VERSION/g' "$1"
}
status=0
while IFS= read -r rel; do
  fa="$a/$rel" fb="$b/$rel"
  if [ ! -e "$fb" ]; then echo "only before: $rel"; status=1; continue; fi
  if cmp -s "$fa" "$fb"; then continue; fi
  case "$rel" in
    *.png) echo "differs (binary): $rel"; status=1 ;;
    *) if ! diff -q <(mask "$fa") <(mask "$fb") >/dev/null; then
         echo "differs: $rel"; diff <(mask "$fa") <(mask "$fb") | head -8; status=1
       fi ;;
  esac
done < <(cd "$a" && find . -type f | sort)
while IFS= read -r rel; do
  [ -e "$a/$rel" ] || { echo "only after: $rel"; status=1; }
done < <(cd "$b" && find . -type f | sort)
[ $status = 0 ] && echo "same outputs: $(cd "$a" && find . -type f | wc -l) files"
exit $status
