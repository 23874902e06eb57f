package spectral

// Waterfall accumulates a Welch spectrum of the whole stream and, beside
// it, a time–frequency picture of bounded size: every segment's
// periodogram is reduced to Cols columns (mean power of adjacent bins)
// and summed into the current row; when the rows reach twice MaxRows,
// neighbouring rows are merged pairwise and each row from then on holds
// twice as many segments. A stream of any length therefore ends with
// between MaxRows and 2·MaxRows rows (fewer for short streams) in memory
// of 2·MaxRows·Cols values.
type Waterfall struct {
	acc     *Accumulator
	maxRows int
	cols    int
	perRow  int
	cur     int // segments in the last row
	rows    [][]float64
	spare   [][]float64
}

// NewWaterfall returns a waterfall over FFT segments of fftSize at rate Hz
// with at most cols columns (fewer if the FFT is shorter) and about
// maxRows rows. It panics if maxRows < 1 or cols < 1, or as
// NewAccumulatorOptions does.
func NewWaterfall(fftSize int, rate float64, maxRows, cols int, opt Options) *Waterfall {
	if maxRows < 1 || cols < 1 {
		panic("spectral: waterfall needs at least one row and column")
	}
	w := &Waterfall{
		acc:     NewAccumulatorOptions(fftSize, rate, opt),
		maxRows: maxRows,
		cols:    min(cols, fftSize),
		perRow:  1,
	}
	w.acc.columns(w.cols, w.segment)
	return w
}

// Add feeds the next block of the stream.
func (w *Waterfall) Add(block []complex64) { w.acc.Add(block) }

// Close releases the accumulator's helper goroutines (see
// Options.Workers); the rows and spectrum stay readable.
func (w *Waterfall) Close() { w.acc.Close() }

// Accumulator returns the underlying Welch accumulator (the average over
// the whole stream).
func (w *Waterfall) Accumulator() *Accumulator { return w.acc }

// Cols returns the number of columns.
func (w *Waterfall) Cols() int { return w.cols }

func (w *Waterfall) newRow() []float64 {
	if n := len(w.spare); n > 0 {
		r := w.spare[n-1]
		w.spare = w.spare[:n-1]
		clear(r)
		return r
	}
	return make([]float64, w.cols)
}

// segment adds one periodogram, summed over each column's bins, to the
// current row.
func (w *Waterfall) segment(p []float64) {
	if len(w.rows) == 0 || w.cur == w.perRow {
		if len(w.rows) == 2*w.maxRows {
			for i := 0; i < w.maxRows; i++ {
				a, b := w.rows[2*i], w.rows[2*i+1]
				for k := range a {
					a[k] += b[k]
				}
				w.rows[i] = a
				w.spare = append(w.spare, b)
			}
			w.rows = w.rows[:w.maxRows]
			w.perRow *= 2
		}
		w.rows = append(w.rows, w.newRow())
		w.cur = 0
	}
	row := w.rows[len(w.rows)-1]
	row = row[:len(p)]
	for c, v := range p {
		row[c] += v
	}
	w.cur++
}

// Rows returns the rows so far, oldest first, as power spectral density
// (power per Hz, as Spectrum.Density) averaged over the row's segments and
// its column's bins; column c covers centred bins [c·n/Cols, (c+1)·n/Cols).
// The last row may hold fewer segments than the others.
func (w *Waterfall) Rows() [][]float64 {
	w.acc.flush()
	n := w.acc.k.n
	out := make([][]float64, len(w.rows))
	for r, row := range w.rows {
		segs := w.perRow
		if r == len(w.rows)-1 {
			segs = w.cur
		}
		o := make([]float64, w.cols)
		for c := range o {
			bins := ceilDiv((c+1)*n, w.cols) - ceilDiv(c*n, w.cols)
			if bins > 0 && segs > 0 {
				o[c] = row[c] * w.acc.densityScale(segs) / float64(bins)
			}
		}
		out[r] = o
	}
	return out
}

// LastRowSeconds returns the stream time the last row spans so far.
func (w *Waterfall) LastRowSeconds() float64 {
	w.acc.flush()
	return float64(w.cur*w.acc.hop) / w.acc.rate
}

// RowSeconds returns the stream time one full row spans.
func (w *Waterfall) RowSeconds() float64 {
	w.acc.flush()
	return float64(w.perRow*w.acc.hop) / w.acc.rate
}

// ceilDiv returns ⌈a/b⌉ for a ≥ 0, b > 0.
func ceilDiv(a, b int) int { return (a + b - 1) / b }
