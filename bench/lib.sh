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
