# Setup shared by bench/run.sh and bench/tx.sh; sourced, not run.
#
# Sets here (this folder), root (the module), refdir (../shared/bench,
# or $REFDIR), DATA (exported; the test data, default $TMPDIR/iqperf),
# PY (Debian's python3) and work (a temporary folder removed on exit).
# bench_setup NAME... installs GNU time (peak memory accounting) and
# python3-scipy (the reference pipelines) when missing, builds ssbkit into
# $work/ssbkit (sets ssbkit), and runs gen_capture.py once if any of the
# files NAME is missing from $DATA.

here=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
root=$(cd "$here/.." && pwd)
refdir=${REFDIR:-$root/../shared/bench}
DATA=${DATA:-${TMPDIR:-/tmp}/iqperf}
export DATA
PY=/usr/bin/python3
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT

# apt_install PKG WHY: installs a Debian package, updating the lists only
# when the first attempt fails.
apt_install() {
	echo "installing $1 ($2)" >&2
	apt-get install -y "$1" >/dev/null 2>&1 || { apt-get update >/dev/null && apt-get install -y "$1" >/dev/null; }
}

bench_setup() {
	[ -x /usr/bin/time ] || apt_install time "peak memory accounting"
	$PY -c 'import numpy, scipy' 2>/dev/null || apt_install python3-scipy "the reference pipelines"
	echo "building ssbkit" >&2
	(cd "$root" && go build -o "$work/ssbkit" ./cmd/ssbkit)
	ssbkit=$work/ssbkit
	local f
	for f in "$@"; do
		if [ ! -s "$DATA/$f" ]; then
			echo "generating the test data in $DATA (about 90 s, once)" >&2
			$PY "$refdir/gen_capture.py"
			break
		fi
	done
}

# timed NAME OUTFILE CMD... runs CMD and prints one line: wall seconds,
# throughput of $nsamples samples in MS/s ($unit names it, e.g. "MS/s
# out"), CPU seconds (user, system) and peak resident memory; it appends
# "seconds kB cpu-seconds" to OUTFILE. Times come from the shell's time
# keyword (millisecond resolution; GNU time rounds to 10 ms, a tenth of a
# fast decode), peak memory from GNU time.
timed() {
	local name=$1 out=$2
	shift 2
	local TIMEFORMAT='%3R %3U %3S'
	{ time /usr/bin/time -f '%M' -o "$work/mem" "$@" >/dev/null 2>"$work/err"; } 2>"$work/time" || {
		cat "$work/err" >&2
		return 1
	}
	local secs kb usr sys
	read -r secs usr sys <"$work/time"
	kb=$(tail -1 "$work/mem")
	echo "$secs $kb $(awk -v u="$usr" -v s="$sys" 'BEGIN { printf "%.3f", u + s }')" >>"$out"
	awk -v n="$name" -v s="$secs" -v k="$kb" -v u="$usr" -v y="$sys" -v ns="$nsamples" -v unit="${unit:-MS/s}" \
		'BEGIN { printf "  %-34s %6.3f s  %7.1f %s  CPU %6.3f s (user %.3f, sys %.3f)  %6.1f MB peak\n", n, s, ns / s / 1e6, unit, u + y, u, y, k / 1024 }'
}

# Summaries of an OUTFILE of timed: best (lowest) and median wall time,
# largest peak memory (kB), lowest and median CPU time.
best() { sort -n "$1" | head -1 | cut -d' ' -f1; }
median() { sort -n "$1" | awk '{ v[NR] = $1 } END { print (NR % 2) ? v[(NR + 1) / 2] : (v[NR / 2] + v[NR / 2 + 1]) / 2 }'; }
peak() { sort -k2 -n "$1" | tail -1 | cut -d' ' -f2; }
bestcpu() { sort -k3 -n "$1" | head -1 | cut -d' ' -f3; }
mediancpu() { sort -k3 -n "$1" | awk '{ v[NR] = $3 } END { print (NR % 2) ? v[(NR + 1) / 2] : (v[NR / 2] + v[NR / 2 + 1]) / 2 }'; }
