#!/usr/bin/env bash
# tx section of the benchmark: ssbkit tx side by side with
# ../shared/bench/modulate_usb.py on the same audio, in one run.
#
#   bench/tx.sh [RUNS]
#
# Jobs: 60 s of 48 kHz audio (audio_60s.wav from gen_capture.py) to USB at
# 2.4 MS/s cf32, whole process against whole process, with the carrier at
# 0 Hz and at +100 kHz (--offset; the reference folds it into its taps, as
# ssbkit does). Runs ssbkit and the reference (its default: FFT Hilbert,
# BLAS polyphase upsampler) alternately, RUNS times each (default 3),
# prints wall seconds, output MS/s, CPU seconds (user + system) and peak
# resident memory (GNU time), then the opposite-sideband suppression of
# both outputs measured by bench/tx_sideband.py (scipy Welch spectrum,
# first 10 s). The machine is shared: quote ratios from one run. Writing
# the 1.15 GB output costs both programs about as much system time as all
# of ssbkit's computing, and varies with what else the disk is doing, so
# the median and the CPU figures are shown beside the best.
set -euo pipefail

runs=${1:-3}
. "$(dirname "$0")/lib.sh"
bench_setup audio_60s.wav
audio=$DATA/audio_60s.wav
cat "$audio" >/dev/null
outsamples=144000000 # 60 s at 2.4 MS/s

nsamples=$outsamples unit="MS/s out"

echo "audio: $audio; $(nproc) cores; load: $(cut -d' ' -f1-3 /proc/loadavg)"
for offset in 0 100000; do
	echo
	echo "== tx: 60 s of 48 kHz audio to USB at 2.4 MS/s cf32, carrier at $offset Hz (ssbkit tx vs modulate_usb.py)"
	s=$work/tx_ssbkit_$offset r=$work/tx_ref_$offset
	: >"$s"
	: >"$r"
	for i in $(seq "$runs"); do
		rm -f "$work/a.cf32" "$work/b.cf32"
		timed "ssbkit tx (run $i)" "$s" "$ssbkit" tx "$audio" --rate 2.4M --offset "$offset" -q -o "$work/a.cf32"
		rm -f "$work/a.cf32"
		timed "modulate_usb.py (run $i)" "$r" $PY "$refdir/modulate_usb.py" "$audio" "$work/b.cf32" --offset "$offset"
		rm -f "$work/b.cf32"
	done
	awk -v a="$(best "$s")" -v b="$(best "$r")" -v ma="$(median "$s")" -v mb="$(median "$r")" -v ca="$(bestcpu "$s")" -v cb="$(bestcpu "$r")" -v ns="$outsamples" -v pa="$(peak "$s")" -v pb="$(peak "$r")" 'BEGIN {
		printf "  best wall: ssbkit %.2f s (%.1f MS/s), reference %.2f s (%.1f MS/s): ssbkit is %.2fx the reference\n", a, ns/a/1e6, b, ns/b/1e6, b/a
		printf "  median wall: ssbkit %.2f s, reference %.2f s: %.2fx\n", ma, mb, mb/ma
		printf "  best CPU:  ssbkit %.2f s, reference %.2f s: %.2fx\n", ca, cb, cb/ca
		printf "  peak memory: ssbkit %.1f MB, reference %.1f MB\n", pa/1024, pb/1024 }'
	echo "  opposite-sideband suppression (goal ≥ 60 dB; reference: FFT mode ≈ 90 dB, FIR mode ≈ 46 dB):"
	"$ssbkit" tx "$audio" --rate 2.4M --offset "$offset" -q -o "$work/a.cf32"
	echo "    ssbkit:    $($PY "$here/tx_sideband.py" "$work/a.cf32" 2.4e6 10 "$offset")"
	rm -f "$work/a.cf32"
	$PY "$refdir/modulate_usb.py" "$audio" "$work/b.cf32" --offset "$offset"
	echo "    reference: $($PY "$here/tx_sideband.py" "$work/b.cf32" 2.4e6 10 "$offset")"
	rm -f "$work/b.cf32"
done
