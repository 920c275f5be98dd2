#!/usr/bin/env bash
# Side by side with scikit-learn, in one run (issue 8). Simulates logs of 1k,
# 5k and 20k digs, trains spade's forest and scikit-learn's on the same
# `spade features` output (200 trees, sqrt features per split, 2 jobs), and
# prints one table row per size: 5-fold accuracy and log-loss, training wall
# time (spade's whole `spade train` process against scikit-learn's fit()
# alone), time to predict 10,000 readings (spade: the whole `spade classify`
# process, reading and feature extraction included; scikit-learn:
# predict_proba on ready features), and peak memory.
#
#   bash train/bench/compare.sh [SIZES...]      (default: 1000 5000 20000)
#
# Installs Debian's python3-sklearn and GNU time when missing. scikit-learn
# is a reference here only, never a dependency of spade.
set -euo pipefail
cd "$(dirname "$0")/../.."
sizes=("${@:-1000 5000 20000}")
read -r -a sizes <<<"${sizes[*]}"

if ! /usr/bin/python3 -c 'import sklearn' 2>/dev/null || [ ! -x /usr/bin/time ]; then
  echo "installing python3-sklearn and time from Debian..." >&2
  apt-get update -qq >&2 && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq python3-sklearn time >&2
fi

work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/spade" ./cmd/spade
spade="$work/spade"
"$spade" simulate --n 10000 --seed 99 --unlabelled -o "$work/new.csv"
"$spade" features "$work/new.csv" -o "$work/new-features.csv" -q

echo "| digs | learner | 5-fold accuracy | log-loss | train (s) | predict 10k (s) | peak memory (MB) |"
echo "|---:|---|---:|---:|---:|---:|---:|"
for n in "${sizes[@]}"; do
  log="$work/log-$n.csv"
  "$spade" simulate --n "$n" --seed 42 -o "$log"
  "$spade" features "$log" -o "$work/features-$n.csv" -q
  ev=$("$spade" evaluate "$log" --folds 5 --trees 200 --seed 1 --format json -q)
  acc=$(echo "$ev" | /usr/bin/python3 -c 'import json,sys; e=json.load(sys.stdin); print("%.3f %.3f" % (e["model"]["accuracy"], e["model"]["log_loss"]))')
  train=$( { /usr/bin/time -f "%e %M" "$spade" train "$log" -o "$work/m.spade" -q >/dev/null; } 2>&1 | tail -n 1)
  pred=$( { /usr/bin/time -f "%e %M" "$spade" classify --model "$work/m.spade" "$work/new.csv" --format csv -o "$work/out.csv" -q; } 2>&1 | tail -n 1)
  read -r a l <<<"$acc"
  read -r ts tm <<<"$train"
  read -r ps pm <<<"$pred"
  peak=$(( (tm > pm ? tm : pm) / 1024 ))
  echo "| $n | spade | $a | $l | $ts | $ps | $peak |"
  sk=$(/usr/bin/python3 train/bench/sklearn_side.py "$work/features-$n.csv" "$work/new-features.csv")
  echo "$sk" | /usr/bin/python3 -c '
import json, sys
s = json.load(sys.stdin)
print("| %s | scikit-learn %s | %.3f | %.3f | %.2f (fit) | %.2f | %.0f |" % (sys.argv[1], s["version"], s["accuracy"], s["log_loss"], s["fit_s"], s["predict_s"], s["peak_mb"]))' "$n"
done
