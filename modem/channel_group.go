package modem

// shiftGroup runs the first stages of up to four channels whose windows
// coincide — the same tap count, decimation and output phase, as the
// channels of one mode and bandwidth in a capture have — over a block in
// one pass of dotSym4AVX2: each window's pair sums and differences are
// formed once for all of them, which is most of the work of a symmetric
// first stage besides the multiply-adds. A channel's outputs are those of
// its ShiftDecimator.Block up to the rounding of the rotation phasor.
// Built only where the kernels run (see newShiftGroup). With fewer than
// four channels the kernel's spare ones repeat channel 0 — taps, phasor
// and output — and so store the same values to the same place.
type shiftGroup struct {
	sds    []*ShiftDecimator
	taps   []float32   // per group of four pair slots: pa, −pb of channels 0…3
	rd     [16]float64 // rotations, as dotSym4AVX2 reads them
	groups int         // groups of four pair slots
}

// newShiftGroup returns the group of sds (one to four decimators), or nil
// when the kernel cannot run them together: no kernels in this build, a
// decimator without the symmetric layout, or windows that differ.
func newShiftGroup(sds []*ShiftDecimator) *shiftGroup {
	if !haveKernels || len(sds) < 1 || len(sds) > 4 {
		return nil
	}
	s0 := sds[0]
	for _, s := range sds {
		if s.st == nil || s.l != s0.l || s.d != s0.d || s.phase != s0.phase || s.st.groups != s0.st.groups {
			return nil
		}
	}
	g := &shiftGroup{sds: sds, groups: s0.st.groups, taps: make([]float32, 64*s0.st.groups)}
	for c := range 4 {
		s := sds[0]
		if c < len(sds) {
			s = sds[c]
		}
		for k := range g.groups {
			copy(g.taps[64*k+16*c:], s.st.pa[8*k:8*k+8])
			copy(g.taps[64*k+16*c+8:], s.st.pb[8*k:8*k+8])
		}
		b := 8*(c%2) + 2*(c/2) // (r₀, r₂) then (r₁, r₃)
		g.rd[b], g.rd[b+1] = real(s.rot), real(s.rot)
		g.rd[b+4], g.rd[b+5] = imag(s.rot), imag(s.rot)
	}
	return g
}

// block appends to outs[c] the outputs of channel c for the window win of
// absolute start a, as ShiftDecimator.Block does. outs has one slice per
// decimator of the group.
func (g *shiftGroup) block(outs [][]complex64, win []complex64, a int64) {
	s0 := g.sds[0]
	l := s0.l
	n, cnt := s0.span(a, int64(len(win)-(l-1)))
	if cnt == 0 {
		return
	}
	j0 := int(n - a)
	if (cnt-1)*s0.d+l > len(win)-j0 {
		panic("modem: kernel window too short")
	}
	var out [4]*complex64
	var q [8]float64
	for c := range 4 {
		if c < len(g.sds) {
			k := len(outs[c])
			outs[c] = grow(outs[c], cnt)[:k+cnt]
			out[c] = &outs[c][k]
		} else {
			out[c] = out[0]
		}
		s := g.sds[0]
		if c < len(g.sds) {
			s = g.sds[c]
		}
		p := phasor(uint64(n)*s.step) * s.post
		b := 4*(c%2) + 2*(c/2) // (q₀, q₂) then (q₁, q₃)
		q[b], q[b+1] = real(p), imag(p)
	}
	dotSym4AVX2(&out, cnt, &win[j0], s0.d, &g.taps[0], g.groups, 8*(l-4), &q, &g.rd)
}
