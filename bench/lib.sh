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

# timed NAME OUTFILE CMD... runs CMD under GNU time and prints one line:
# wall seconds, throughput of $nsamples samples in MS/s ($unit names it,
# e.g. "MS/s out"), CPU seconds (user, system) and peak resident memory;
# it appends "seconds kB cpu-seconds" to OUTFILE.
timed() {
	local name=$1 out=$2
	shift 2
	/usr/bin/time -f '%e %M %U %S' -o "$work/time" "$@" >/dev/null 2>"$work/err" || {
		cat "$work/err" >&2
		return 1
	}
	local secs kb usr sys
	read -r secs kb usr sys <"$work/time"
	echo "$secs $kb $(awk -v u="$usr" -v s="$sys" 'BEGIN { printf "%.2f", u + s }')" >>"$out"
	awk -v n="$name" -v s="$secs" -v k="$kb" -v u="$usr" -v y="$sys" -v ns="$nsamples" -v unit="${unit:-MS/s}" \
		'BEGIN { printf "  %-34s %6.2f s  %7.1f %s  CPU %5.2f s (user %.2f, sys %.2f)  %6.1f MB peak\n", n, s, ns / s / 1e6, unit, u + y, u, y, k / 1024 }'
}

# Summaries of an OUTFILE of timed: best (lowest) and median wall time,
# largest peak memory (kB), lowest CPU time.
best() { sort -n "$1" | head -1 | cut -d' ' -f1; }
median() { sort -n "$1" | awk '{ v[NR] = $1 } END { print (NR % 2) ? v[(NR + 1) / 2] : (v[NR / 2] + v[NR / 2 + 1]) / 2 }'; }
peak() { sort -k2 -n "$1" | tail -1 | cut -d' ' -f2; }
bestcpu() { sort -k3 -n "$1" | head -1 | cut -d' ' -f3; }
