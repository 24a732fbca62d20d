#!/bin/sh
# The cost of --unit reworded against --unit words on the scale corpora of
# scripts/bench (generate them first: go run ./scripts/bench -work DIR
# -sizes 10000,100000 -generate-only). The two commands alternate, RUNS
# times each, so that both see the same load; prints every wall time and
# peak RSS with the load average (1, 5, 15 minutes) before the run, then
# the medians and their ratio.
#
#   scripts/bench-reworded/run.sh DIR [RUNS]
set -eu
dir=$1
runs=${2:-5}
bin=$(mktemp -d)/reprise
go build -o "$bin" ./cmd/reprise
for corpus in "$dir"/corpus-*-v2; do
	[ -d "$corpus" ] || continue
	w=""; r=""
	i=0
	while [ "$i" -lt "$runs" ]; do
		for unit in words reworded; do
			load=$(cut -d' ' -f1-3 /proc/loadavg)
			/usr/bin/time -f "%e %M" -o /tmp/bench-reworded.time "$bin" scan --format json -o /dev/null -q --unit "$unit" "$corpus"
			t=$(cat /tmp/bench-reworded.time)
			echo "$(basename "$corpus") $unit $t load $load"
			if [ "$unit" = words ]; then w="$w ${t%% *}"; else r="$r ${t%% *}"; fi
		done
		i=$((i + 1))
	done
	mw=$(echo $w | tr ' ' '\n' | sort -n | awk '{a[NR]=$1} END {print a[int((NR+1)/2)]}')
	mr=$(echo $r | tr ' ' '\n' | sort -n | awk '{a[NR]=$1} END {print a[int((NR+1)/2)]}')
	echo "$(basename "$corpus"): median words $mw s, reworded $mr s, ratio $(echo "$mr $mw" | awk '{printf "%.2f", $1/$2}')"
done
rm -rf "$(dirname "$bin")"
