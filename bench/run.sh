#!/usr/bin/env bash
# ssbkit side by side with the numpy/scipy references in ../shared/bench
# (see bench/README.md). Usage:
#
#   bench/run.sh [rx] [kernels] [tune] [channels] [RUNS]
#
# Sections: setup (build, tools, test data), rx (decode), kernels (the
# same decode built with and without the assembly kernels), tune (one
# channel with and without --fine-tune), channels (1, 32, 128 and 256
# channels in one pass, side by side; then 1 and 32 with the capture read
# as 2.5 MS/s, and 32 and 128 with the default AGC). Each section
# times its commands alternately on the same file, RUNS times each
# (default 3), and prints input MS/s, the ratio, CPU time and peak
# resident memory (GNU time). The machine is shared: quote ratios from
# one run.
set -euo pipefail

. "$(dirname "$0")/lib.sh"

sections=()
runs=3
for a in "$@"; do
	case $a in
	rx | kernels | tune | channels) sections+=("$a") ;;
	[0-9]*) runs=$a ;;
	*) echo "usage: $0 [rx] [kernels] [tune] [channels] [RUNS]" >&2; exit 2 ;;
	esac
done
[ ${#sections[@]} -gt 0 ] || sections=(rx)

# ---------------------------------------------------------------- setup
bench_setup capture_60s.cu8 capture.json
cap=$DATA/capture_60s.cu8
insamples=$(( $(stat -c %s "$cap") / 2 ))
# warm the page cache so that neither side pays the first read
cat "$cap" >/dev/null

nsamples=$insamples unit="MS/s"

# ---------------------------------------------------------------- rx
section_rx() {
	echo
	echo "== rx: one USB channel, 60 s of 2.4 MS/s cu8, AGC off (ssbkit rx vs decode_usb.py)"
	local s=$work/rx_ssbkit r=$work/rx_ref m=$work/rx_multi o=$work/rx_one
	: >"$s"; : >"$r"; : >"$m"; : >"$o"
	for i in $(seq "$runs"); do
		rm -f "$work/a.wav" "$work/b.wav"
		timed "ssbkit rx (run $i)" "$s" "$ssbkit" rx "$cap" --rate 2.4M --offset 120k --agc off -q -o "$work/a.wav"
		timed "decode_usb.py (run $i)" "$r" $PY "$refdir/decode_usb.py" "$cap" "$work/b.wav" --offset 120000 --no-agc
	done
	local ts tr
	ts=$(best "$s"); tr=$(best "$r")
	awk -v a="$ts" -v b="$tr" -v ns="$insamples" -v pa="$(peak "$s")" -v pb="$(peak "$r")" 'BEGIN {
		printf "  best: ssbkit %.2f s (%.1f MS/s), reference %.2f s (%.1f MS/s): ssbkit is %.2fx the reference\n", a, ns/a/1e6, b, ns/b/1e6, b/a
		printf "  peak memory: ssbkit %.1f MB, reference %.1f MB\n", pa/1024, pb/1024 }'
	echo "  audio quality (check_decode.py, SNR within 1 dB of the reference's is the goal):"
	$PY "$refdir/check_decode.py" "$work/a.wav@120000" "$work/b.wav@120000" | sed 's/^/    /'

	echo
	echo "== rx: four channels in one pass against two single-channel passes"
	for i in $(seq "$runs"); do
		rm -f "$work"/m_*.wav "$work/c.wav"
		timed "ssbkit rx, 4 channels (run $i)" "$m" "$ssbkit" rx "$cap" --rate 2.4M --offset -300k --offset 120k --offset 500k --offset 700k --agc off -q -o "$work/m_{freq}.wav"
		timed "ssbkit rx, 1 channel (run $i)" "$o" "$ssbkit" rx "$cap" --rate 2.4M --offset 500k --agc off -q -o "$work/c.wav"
	done
	awk -v a="$(best "$m")" -v b="$(best "$o")" -v ca="$(bestcpu "$m")" -v cb="$(bestcpu "$o")" \
		-v ma="$(median "$m")" -v mb="$(median "$o")" -v mca="$(mediancpu "$m")" -v mcb="$(mediancpu "$o")" 'BEGIN {
		printf "  best wall:   four channels %.3f s, one channel %.3f s: four in one pass cost %.2f single passes (goal < 2)\n", a, b, a/b
		printf "  median wall: four channels %.3f s, one channel %.3f s: %.2f single passes\n", ma, mb, ma/mb
		printf "  best CPU:    four channels %.3f s, one channel %.3f s: %.2f single passes\n", ca, cb, ca/cb
		printf "  median CPU:  four channels %.3f s, one channel %.3f s: %.2f single passes\n", mca, mcb, mca/mcb }'
	$PY "$refdir/check_decode.py" "$work/m_-300000.wav@-300000" "$work/m_+120000.wav@120000" "$work/m_+500000.wav@500000" | sed 's/^/    /'
}

# ---------------------------------------------------------------- kernels
section_kernels() {
	echo
	echo "== kernels: ssbkit rx with the AVX2/FMA kernels against the same build with -tags purego (the Go loops)"
	local pure=$work/ssbkit-purego k1=$work/k_asm1 k4=$work/k_asm4 p1=$work/k_go1 p4=$work/k_go4
	(cd "$root" && go build -tags purego -o "$pure" ./cmd/ssbkit)
	: >"$k1"; : >"$k4"; : >"$p1"; : >"$p4"
	local four=(--offset -300k --offset 120k --offset 500k --offset 700k)
	for i in $(seq "$runs"); do
		rm -f "$work"/k_*.wav
		timed "kernels, 1 channel (run $i)" "$k1" "$ssbkit" rx "$cap" --rate 2.4M --offset 120k --agc off -q -o "$work/k_a.wav"
		timed "purego, 1 channel (run $i)" "$p1" "$pure" rx "$cap" --rate 2.4M --offset 120k --agc off -q -o "$work/k_b.wav"
		timed "kernels, 4 channels (run $i)" "$k4" "$ssbkit" rx "$cap" --rate 2.4M "${four[@]}" --agc off -q -o "$work/k_a_{freq}.wav"
		timed "purego, 4 channels (run $i)" "$p4" "$pure" rx "$cap" --rate 2.4M "${four[@]}" --agc off -q -o "$work/k_b_{freq}.wav"
	done
	awk -v a1="$(best "$k1")" -v b1="$(best "$p1")" -v a4="$(best "$k4")" -v b4="$(best "$p4")" \
		-v c1="$(bestcpu "$k1")" -v d1="$(bestcpu "$p1")" -v c4="$(bestcpu "$k4")" -v d4="$(bestcpu "$p4")" 'BEGIN {
		printf "  best wall: 1 channel %.2f s (purego %.2f s), 4 channels %.2f s (purego %.2f s)\n", a1, b1, a4, b4
		printf "  best CPU:  1 channel %.2f s (purego %.2f s), 4 channels %.2f s (purego %.2f s)\n", c1, d1, c4, d4
		printf "  four in one pass cost %.2f single passes with the kernels, %.2f with -tags purego\n", a4/a1, b4/b1 }'
	$PY "$refdir/check_decode.py" "$work/k_a.wav@120000" "$work/k_b.wav@120000" | sed 's/^/    /'
}

# ---------------------------------------------------------------- channels
# offsets N: the three voice signals of the capture (-300k, +120k, +500k)
# and N-3 more channels spread evenly over ±1.15 MHz, none within 6 kHz
# of another.
channel_offsets() {
	awk -v n="$1" 'BEGIN {
		split("-300000 120000 500000", sig, " ")
		k = 0
		for (i = 1; i <= 3 && k < n; i++) { off[++k] = sig[i] }
		m = n - k; step = 2300000 / (m + 3)
		for (i = 0; k < n; i++) {
			f = int(-1150000 + step * (i + 0.5)); ok = 1
			for (j = 1; j <= k; j++) if ((f - off[j]) ^ 2 < 36e6) ok = 0
			if (ok) off[++k] = f
			if (i > 10 * n) break
		}
		for (j = 1; j <= k; j++) printf "--offset %d ", off[j]
	}'
}

section_channels() {
	echo
	echo "== channels: 1, 32, 128 and 256 USB channels in one pass (AGC off), against one single-channel pass"
	local counts=(1 32 128 256) c i
	for c in "${counts[@]}"; do : >"$work/ch_$c"; done
	# what the receiver chose, once
	for c in 32 128 256; do
		rm -rf "$work/chs"; mkdir -p "$work/chs"
		local said
		# shellcheck disable=SC2046
		said=$("$ssbkit" rx "$cap" --rate 2.4M $(channel_offsets "$c") --agc off -o "$work/chs/c_{freq}.wav" 2>&1 | grep channeliser || true)
		echo "  ${said:-$c channels: each its own first stage}"
	done
	for i in $(seq "$runs"); do
		for c in "${counts[@]}"; do
			rm -rf "$work/chs"; mkdir -p "$work/chs"
			if [ "$c" = 1 ]; then
				timed "ssbkit rx, 1 channel (run $i)" "$work/ch_1" "$ssbkit" rx "$cap" --rate 2.4M --offset 120k --agc off -q -o "$work/chs/c_{freq}.wav"
			else
				# shellcheck disable=SC2046
				timed "ssbkit rx, $c channels (run $i)" "$work/ch_$c" "$ssbkit" rx "$cap" --rate 2.4M $(channel_offsets "$c") --agc off -q -o "$work/chs/c_{freq}.wav"
			fi
		done
	done
	local b1 m1 cb1 cm1
	b1=$(best "$work/ch_1"); m1=$(median "$work/ch_1"); cb1=$(bestcpu "$work/ch_1"); cm1=$(mediancpu "$work/ch_1")
	echo "  channels  best wall  (single passes)  median wall  (passes)  best CPU  (passes)  median CPU  (passes)  peak memory  goal (wall)"
	for c in "${counts[@]}"; do
		awk -v c="$c" -v b="$(best "$work/ch_$c")" -v m="$(median "$work/ch_$c")" -v cb="$(bestcpu "$work/ch_$c")" -v cm="$(mediancpu "$work/ch_$c")" \
			-v b1="$b1" -v m1="$m1" -v cb1="$cb1" -v cm1="$cm1" -v pk="$(peak "$work/ch_$c")" 'BEGIN {
			goal = (c == 32) ? "≤ 2.5" : (c == 128) ? "≤ 5" : (c == 1) ? "as today" : ""
			printf "  %8d  %8.3f s  (%5.2f)          %8.3f s  (%5.2f)   %6.3f s  (%5.2f)  %7.3f s  (%5.2f)  %7.1f MB   %s\n", c, b, b/b1, m, m/m1, cb, cb/cb1, cm, cm/cm1, pk/1024, goal }'
	done
	echo "  audio of the capture's three voice signals from the 128-channel pass (check_decode.py):"
	rm -rf "$work/chs"; mkdir -p "$work/chs"
	# shellcheck disable=SC2046
	"$ssbkit" rx "$cap" --rate 2.4M $(channel_offsets 128) --agc off -q -o "$work/chs/c_{freq}.wav"
	$PY "$refdir/check_decode.py" "$work/chs/c_-300000.wav@-300000" "$work/chs/c_+120000.wav@120000" "$work/chs/c_+500000.wav@500000" | sed 's/^/    /'

	# The same file read as 2.5 MS/s, a common capture rate with no
	# integer path to 48 kHz audio (625/12): every chain ends in a
	# rational resampler, through the channeliser too.
	echo "  the same capture read as 2.5 MS/s (chains ending in a rational resampler):"
	: >"$work/r25_1"; : >"$work/r25_32"
	for i in $(seq "$runs"); do
		rm -rf "$work/chs"; mkdir -p "$work/chs"
		timed "ssbkit rx at 2.5 MS/s, 1 channel (run $i)" "$work/r25_1" "$ssbkit" rx "$cap" --rate 2.5M --offset 120k --agc off -q -o "$work/chs/c_{freq}.wav"
		rm -rf "$work/chs"; mkdir -p "$work/chs"
		# shellcheck disable=SC2046
		timed "ssbkit rx at 2.5 MS/s, 32 channels (run $i)" "$work/r25_32" "$ssbkit" rx "$cap" --rate 2.5M $(channel_offsets 32) --agc off -q -o "$work/chs/c_{freq}.wav"
	done
	awk -v a="$(best "$work/r25_1")" -v b="$(best "$work/r25_32")" -v ca="$(bestcpu "$work/r25_1")" -v cb="$(bestcpu "$work/r25_32")" 'BEGIN {
		printf "  2.5 MS/s best wall: one channel %.3f s, 32 channels %.3f s (%.2f single passes); best CPU %.3f / %.3f s\n", a, b, b/a, ca, cb }'

	# What a user gets by default: the AGC on (medium).
	echo "  with the default AGC (medium) instead of --agc off:"
	: >"$work/agc_32"; : >"$work/agc_128"
	for i in $(seq "$runs"); do
		for c in 32 128; do
			rm -rf "$work/chs"; mkdir -p "$work/chs"
			# shellcheck disable=SC2046
			timed "ssbkit rx, $c channels, default AGC (run $i)" "$work/agc_$c" "$ssbkit" rx "$cap" --rate 2.4M $(channel_offsets "$c") -q -o "$work/chs/c_{freq}.wav"
		done
	done
	awk -v a="$(best "$work/agc_32")" -v b="$(best "$work/agc_128")" -v ca="$(bestcpu "$work/agc_32")" -v cb="$(bestcpu "$work/agc_128")" 'BEGIN {
		printf "  default AGC best wall: 32 channels %.3f s, 128 channels %.3f s; best CPU %.3f / %.3f s\n", a, b, ca, cb }'
	rm -rf "$work/chs"
}

# ---------------------------------------------------------------- tune
section_tune() {
	echo
	echo "== rx --fine-tune: one USB channel, 60 s of 2.4 MS/s cu8, AGC off, with and without fine tuning (goal: at most 20 % more)"
	local a=$work/ft_off b=$work/ft_on
	: >"$a"; : >"$b"
	for i in $(seq "$runs"); do
		rm -f "$work"/ft_*.wav
		timed "ssbkit rx (run $i)" "$a" "$ssbkit" rx "$cap" --rate 2.4M --offset 120k --agc off -q -o "$work/ft_a.wav"
		timed "ssbkit rx --fine-tune (run $i)" "$b" "$ssbkit" rx "$cap" --rate 2.4M --offset 120k --agc off -q --fine-tune -o "$work/ft_b.wav"
	done
	awk -v a="$(best "$a")" -v b="$(best "$b")" -v ca="$(bestcpu "$a")" -v cb="$(bestcpu "$b")" \
		-v ma="$(median "$a")" -v mb="$(median "$b")" -v mca="$(mediancpu "$a")" -v mcb="$(mediancpu "$b")" 'BEGIN {
		printf "  best wall:   %.3f s, with --fine-tune %.3f s: %+.1f %%\n", a, b, 100*(b/a-1)
		printf "  median wall: %.3f s, with --fine-tune %.3f s: %+.1f %%\n", ma, mb, 100*(mb/ma-1)
		printf "  best CPU:    %.3f s, with --fine-tune %.3f s: %+.1f %%\n", ca, cb, 100*(cb/ca-1)
		printf "  median CPU:  %.3f s, with --fine-tune %.3f s: %+.1f %%\n", mca, mcb, 100*(mcb/mca-1) }'
	echo "  (the capture's signals are voice-like noise, never voiced: the estimator's frames stop after the"
	echo "  pitch search; on voice the analysis costs about 1.4 times as much, BenchmarkTuneEstimator)"
}

echo "input: $cap ($insamples samples); $(nproc) cores; load: $(cut -d' ' -f1-3 /proc/loadavg)"
for sec in "${sections[@]}"; do
	"section_$sec"
done
