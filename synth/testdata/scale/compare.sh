#!/bin/sh
# Times ohmfit's proven search beside a plain brute force written in Go
# (the closed-form enumeration in synth/scale_bench_test.go, over a 1/16
# slice of the space, extrapolated to the whole), in one run, for each scale
# case. Run from the repository root: sh synth/testdata/scale/compare.sh
set -e
bin=$(mktemp -d)/ohmfit
go build -o "$bin" ./cmd/ohmfit
for f in loaded3-e96 ladder4-e96 diff4-e96 skew4-e96 taps5-e24; do
	start=$(date +%s%N)
	"$bin" fit "synth/testdata/scale/$f.yaml" --workers 1 --top 1 --format json >/dev/null
	end=$(date +%s%N)
	echo "$f: ohmfit proven in $(( (end - start) / 1000000 )) ms (whole process)"
	go test ./synth -run '^$' -bench "Scale/$f/brute" -benchtime 1x | grep -o '[0-9.]* s/whole-space' | sed 's/^/    brute force, whole space: /'
done
