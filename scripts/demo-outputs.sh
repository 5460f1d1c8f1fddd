#!/usr/bin/env bash
# Runs every demo through one neckline binary and keeps all it prints and writes, so that two
# builds can be compared byte for byte (see scripts/same-outputs.sh).
#   scripts/demo-outputs.sh BINARY OUTDIR
# Each command's stdout, stderr and exit status go to OUTDIR/NN-name.{stdout,stderr,status};
# each output folder to OUTDIR/NN-name/. Run from the repository root.
set -uo pipefail
# Both runs write under one fixed folder with the binary named `neckline`, so that wrapped
# paths and the usage line are alike; the results are then moved to OUTDIR.
dest=$2
work=${TMPDIR:-/tmp}/neckline-demo-outputs
# One run at a time in that folder (two runs at once would mix their files).
mkdir -p "$(dirname "$work")"
exec 9>"$work.lock"
flock 9
rm -rf "$work" "$dest"
mkdir -p "$work/bin" "$work/out"
cp "$1" "$work/bin/neckline"
bin=$work/bin/neckline
out=$work/out
n=0
run() {
  local name=$1
  shift
  n=$((n + 1))
  local tag
  tag=$(printf '%02d-%s' "$n" "$name")
  mkdir -p "$out/$tag"
  "$@" >"$out/$tag.stdout" 2>"$out/$tag.stderr" </dev/null
  echo $? >"$out/$tag.status"
}
d=demo-parts
lim=limits/steel-0.80mm-n0.20-keeler-brazier.toml
T="$out"
run t1 "$bin" check $d/rear-floor-pan/tryout-1.csv --job $d/rear-floor-pan/job-t1.toml --out "$T/01-t1"
run t2 "$bin" check $d/rear-floor-pan/tryout-2.csv --job $d/rear-floor-pan/job-t2.toml --out "$T/02-t2"
run review "$bin" compare "$T/01-t1/points.csv" "$T/02-t2/points.csv" --out "$T/03-review"
run field "$bin" check $d/rear-floor-pan-field/field-t1.csv --job $d/rear-floor-pan-field/job.toml --out "$T/04-field"
run grid "$bin" grid $d/rear-floor-pan-grid/nodes.csv --job $d/rear-floor-pan-grid/job.toml --out "$T/05-grid"
run fit "$bin" fit $d/rear-floor-pan-grid/outlines.csv --out "$T/06-fit/fitted.csv"
run fitcheck "$bin" check "$T/06-fit/fitted.csv" --job $d/rear-floor-pan-grid/job.toml --d0 2.5 --out "$T/07-fitcheck"
run strains "$bin" strains $d/rear-floor-pan/tryout-1.csv --d0 2.5
run kb "$bin" limit keeler-brazier --n 0.20 --thickness 0.8 --out "$T/09-kb/kb.toml"
run kbin "$bin" limit keeler-brazier --n 0.20 --thickness 0.0315 --unit in
run necking "$bin" limit necking --n 0.22 --right storen-rice --out "$T/11-necking/necking.toml"
run mk "$bin" limit mk --n 0.22 --r0 1.8 --r45 1.3 --r90 2.2 --f0 0.99 --out "$T/12-mk/mk.toml" --plot "$T/12-mk/mk.png"
run limitcmp "$bin" limit compare "$T/09-kb/kb.toml" "$T/12-mk/mk.toml" --at -40,-20,0,20
run shop "$bin" limit from-parts $d/rear-floor-pan-shop-curve/parts.csv --job $d/rear-floor-pan/job-t1.toml --out "$T/14-shop/shop.toml" --plot "$T/14-shop/shop.png"
run t1shop "$bin" check $d/rear-floor-pan/tryout-1.csv --job $d/rear-floor-pan/job-t1.toml --limit "$T/14-shop/shop.toml" --out "$T/15-t1shop"
run bracket "$bin" check $d/tunnel-bracket-two-stage/bracket.csv --job $d/tunnel-bracket-two-stage/job.toml --out "$T/16-bracket"
run truestrain "$bin" check $d/rear-floor-pan/tryout-1.csv --job $d/rear-floor-pan/job-t1.toml --plot-strain true --margin 8 --max-thinning 25 --fail-on marginal --reading-error 0.02 --out "$T/17-truestrain"
run stdout "$bin" check $d/rear-floor-pan/tryout-1.csv --job $d/rear-floor-pan/job-t1.toml --format json --points - --out "$T/18-stdout"
run several "$bin" check $d/rear-floor-pan/tryout-1.csv $d/rear-floor-pan/tryout-2.csv --job $d/rear-floor-pan/job-t1.toml --out "$T/19-several"
run help "$bin" --help
for c in check strains compare grid fit limit; do run "help-$c" "$bin" "$c" --help; done
run badarg "$bin" check --nonsense
run missing "$bin" check no-such-file.csv --limit $lim
mkdir -p "$(dirname "$dest")"
mv "$out" "$dest"
rm -rf "$work"
echo "$n commands run into $dest"
