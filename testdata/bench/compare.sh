#!/bin/sh
# Side-by-side comparison of lotproof with the pandas + scipy reference
# script (pandas_reference.py) on a generated, invented year of receipts.
# Not run by CI; needs /usr/bin/time and Debian's python3-pandas and
# python3-scipy (apt-get install -y python3-pandas python3-scipy).
#   testdata/bench/compare.sh [SPECIMENS [LOTS]]     (default 1000000 20000)
# Prints CPU seconds (user + system), wall-clock seconds and peak RSS of
# each run, and the ratios script / lotproof. Run from the repository root.
set -eu
N=${1:-1000000}
L=${2:-20000}
W=$(mktemp -d)
trap 'rm -rf "$W"' EXIT
go build -o "$W/lotproof" ./cmd/lotproof
go run ./lots/scale/gen -specimens "$N" -lots "$L" -o "$W/receipts.csv"
B=testdata/bench
echo "input: $N specimens, $L lots, $(wc -c < "$W/receipts.csv") bytes; $(nproc) cores"
/usr/bin/python3 -c 'import pandas, scipy; print("pandas", pandas.__version__, "scipy", scipy.__version__)'
# measure NAME CMD...: one line "NAME cpu_s rss_mib wall_s"
measure() {
	name=$1
	shift
	/usr/bin/time -f "%U %S %M %e" -o "$W/t" "$@" > /dev/null 2> "$W/err" || true
	tail -n 1 "$W/t" | awk -v n="$name" '{printf "%s %.2f %.0f %.2f\n", n, $1 + $2, $3 / 1024, $4}'

}
{
	measure lotproof-accept-one "$W/lotproof" --format csv accept "$W/receipts.csv" --spec $B/spec-one.yaml
	measure script-accept-one /usr/bin/python3 $B/pandas_reference.py "$W/receipts.csv" 0.90 0.95 5 "tensile [MPa]=950"
	measure lotproof-accept-three "$W/lotproof" --format csv accept "$W/receipts.csv" --spec $B/spec-three.yaml
	measure script-accept-three /usr/bin/python3 $B/pandas_reference.py "$W/receipts.csv" 0.90 0.95 5 "tensile [MPa]=950" "proof [MPa]=850" "elongation [%]=13"
	measure lotproof-summary "$W/lotproof" --format csv summary "$W/receipts.csv"
} > "$W/results"
awk -v bytes="$(wc -c < "$W/receipts.csv")" '
	{ cpu[$1] = $2; rss[$1] = $3; wall[$1] = $4; print $1 ": " $2 " CPU-s, " $4 " s wall, " $3 " MiB" }
	END {
		printf "accept, one minimum:    script/lotproof CPU ratio %.2f, wall ratio %.2f (lotproof %s MiB, script %s MiB)\n", cpu["script-accept-one"] / cpu["lotproof-accept-one"], wall["script-accept-one"] / wall["lotproof-accept-one"], rss["lotproof-accept-one"], rss["script-accept-one"]
		printf "accept, three minimums: script/lotproof CPU ratio %.2f, wall ratio %.2f (lotproof %s MiB, script %s MiB)\n", cpu["script-accept-three"] / cpu["lotproof-accept-three"], wall["script-accept-three"] / wall["lotproof-accept-three"], rss["lotproof-accept-three"], rss["script-accept-three"]
		printf "summary: %.0f MB per CPU-second, %.0f MB/s wall, %s MiB\n", bytes / 1e6 / cpu["lotproof-summary"], bytes / 1e6 / wall["lotproof-summary"], rss["lotproof-summary"]
	}' "$W/results"
