#!/usr/bin/env bash
# Throughput of reprise-beam on Prism beside reprise scan, on the same corpus
# (default: the 500 Brown samples in .cache/data/brown, from scripts/fetch-data.sh).
# Usage: beam/scripts/throughput.sh [PATH...]
set -euo pipefail
root="$(cd "$(dirname "$0")/../.." && pwd)"
corpus=("$@")
[ ${#corpus[@]} -gt 0 ] || corpus=("${REPRISE_DATA:-$root/.cache/data}/brown")
bin=$(mktemp -d); trap 'rm -rf "$bin"' EXIT
(cd "$root" && go build -o "$bin/reprise" ./cmd/reprise)
(cd "$root/beam" && go build -o "$bin/reprise-beam" ./cmd/reprise-beam)
for run in 1 2 3; do
  /usr/bin/time -f "run $run: reprise scan        %e s wall, %M KiB peak" \
    "$bin/reprise" scan -q --format json -o "$bin/scan.json" "${corpus[@]}"
  /usr/bin/time -f "run $run: reprise-beam prism  %e s wall, %M KiB peak" \
    "$bin/reprise-beam" -q --format json -o "$bin/beam.json" "${corpus[@]}"
done
python3 - "$bin/scan.json" "$bin/beam.json" <<'PY'
import json, sys
a, b = (json.load(open(p)) for p in sys.argv[1:])
s = a["summary"]
print(f'{s["documents"]} documents, {s["words"]} words, {s["units"]} sentences, {s["pairs"]} pairs')
for k in ("settings",):
    a.pop(k); b.pop(k)
for m in (a, b):
    m["summary"].pop("counter"); m["summary"].pop("pruned")
print("same report apart from settings, counter, pruned:", a == b)
PY
