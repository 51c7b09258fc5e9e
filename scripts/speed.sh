#!/bin/sh
# Whole-process speed of renderchain on this machine, repeatable.
#
# Builds the command, writes music-like dry takes (the demo's synthesized
# plucked-string phrase, scripts/drytake), and times whole renders (read,
# prepare, choose the factor, render, write) with /usr/bin/time. Realtime
# factor = seconds of audio / wall seconds. Before each row the two-thread
# check (scripts/corecheck) says whether a second core was free: 1.0 yes,
# 2.0 no. On a shared host the figures move with it; cpu s over wall s is
# the cores the run itself got.
#
#   scripts/speed.sh            # whole-process table
#   BENCH=1 scripts/speed.sh    # and the go test benchmarks of the README
#
# Needs: go, /usr/bin/time (GNU time), awk.
set -eu
cd "$(dirname "$0")/.."
dir=$(mktemp -d)
trap 'rm -rf "$dir"' EXIT
go build -o "$dir/renderchain" ./cmd/renderchain
go build -o "$dir/corecheck" ./scripts/corecheck
go run ./scripts/drytake -seconds 20 -out "$dir/dry20.wav"
go run ./scripts/drytake -seconds 60 -out "$dir/dry60.wav"

echo "machine: $(nproc) cores, $(uname -m); go $(go env GOVERSION)"
printf '%-52s %8s %8s %9s %9s %s\n' "render" "wall s" "cpu s" "realtime" "factor" "two-thread check"

# time_render LABEL SECONDS ARGS… renders and prints one row.
time_render() {
	label=$1 secs=$2
	shift 2
	load=$("$dir/corecheck")
	/usr/bin/time -f '%e %U %S' -o "$dir/time" "$dir/renderchain" render --quiet --report "$dir/r.json" --out "$dir/wet.wav" "$@"
	factor=$(sed -n 's/.*"oversample": \([0-9]*\).*/\1/p' "$dir/r.json" | head -n 1)
	awk -v l="$label" -v s="$secs" -v f="$factor" -v ld="$load" \
		'{ printf "%-52s %8.2f %8.2f %8.1fx %8sx %s\n", l, $1, $2 + $3, s / $1, f, ld }' "$dir/time"
}

demo=chains/demo.toml
time_render "demo, 20 s, default (auto factor, all cores)" 20 --chain $demo --in "$dir/dry20.wav"
time_render "demo, 20 s, default, one core" 20 --chain $demo --in "$dir/dry20.wav" --workers 1
time_render "demo, 20 s, 4x, one core (the old default)" 20 --chain $demo --in "$dir/dry20.wav" --workers 1 --oversample 4
time_render "demo at fuzz 1, 20 s, default" 20 --chain $demo --in "$dir/dry20.wav" --set fuzz.fuzz=1
time_render "demo at fuzz 1, 20 s, default, one core" 20 --chain $demo --in "$dir/dry20.wav" --set fuzz.fuzz=1 --workers 1
time_render "demo, 60 s, default (all cores)" 60 --chain $demo --in "$dir/dry60.wav"
time_render "demo, 60 s, default, one core" 60 --chain $demo --in "$dir/dry60.wav" --workers 1
time_render "linear chain, 20 s, default" 20 --chain dsp/wdf/testdata/linear.toml --in "$dir/dry20.wav"
time_render "twelve-port cascade, 20 s, default" 20 --chain dsp/wdf/testdata/cascade12.toml --in "$dir/dry20.wav"
time_render "twelve-port cascade, 20 s, 4x, one core" 20 --chain dsp/wdf/testdata/cascade12.toml --in "$dir/dry20.wav" --oversample 4 --workers 1

if [ "${BENCH:-}" = 1 ]; then
	echo "two-thread check before the benchmarks: $("$dir/corecheck")"
	go test -run XXX -bench 'ChainDemo$|ChainCascade12|ChainLinear|RootPorts' -benchtime 2x ./dsp/wdf/
	go test -run XXX -bench 'LongMono' -benchtime 1x ./engine/
fi
