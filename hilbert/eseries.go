package hilbert

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// The IEC 60063:2015 preferred-number series for resistors and
// capacitors. E6, E12 and E24 have two significant figures, E48, E96 and
// E192 three. The standard defines E12 as every second value of E24 and E6
// as every second value of E12, and likewise E96 and E48 from E192, so
// only E24 and E192 are written out.
var (
	e24 = [24]int{10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91}

	e192 = [192]int{
		100, 101, 102, 104, 105, 106, 107, 109, 110, 111, 113, 114, 115, 117, 118, 120,
		121, 123, 124, 126, 127, 129, 130, 132, 133, 135, 137, 138, 140, 142, 143, 145,
		147, 149, 150, 152, 154, 156, 158, 160, 162, 164, 165, 167, 169, 172, 174, 176,
		178, 180, 182, 184, 187, 189, 191, 193, 196, 198, 200, 203, 205, 208, 210, 213,
		215, 218, 221, 223, 226, 229, 232, 234, 237, 240, 243, 246, 249, 252, 255, 258,
		261, 264, 267, 271, 274, 277, 280, 284, 287, 291, 294, 298, 301, 305, 309, 312,
		316, 320, 324, 328, 332, 336, 340, 344, 348, 352, 357, 361, 365, 370, 374, 379,
		383, 388, 392, 397, 402, 407, 412, 417, 422, 427, 432, 437, 442, 448, 453, 459,
		464, 470, 475, 481, 487, 493, 499, 505, 511, 517, 523, 530, 536, 542, 549, 556,
		562, 569, 576, 583, 590, 597, 604, 612, 619, 626, 634, 642, 649, 657, 665, 673,
		681, 690, 698, 706, 715, 723, 732, 741, 750, 759, 768, 777, 787, 796, 806, 816,
		825, 835, 845, 856, 866, 876, 887, 898, 909, 920, 931, 942, 953, 965, 976, 988,
	}
)

// SeriesNames lists the preferred-number series Series knows, coarsest
// first.
var SeriesNames = []string{"E6", "E12", "E24", "E48", "E96", "E192"}

// Series returns the values of the IEC 60063 series name (E6, E12, E24,
// E48, E96 or E192; case does not matter) in one decade as mantissas in
// [1, 10), ascending: E12 gives 1.0, 1.2, 1.5, … 8.2.
func Series(name string) ([]float64, error) {
	var (
		src   []int
		step  int
		scale float64
	)
	switch strings.ToUpper(strings.TrimSpace(name)) {
	case "E6":
		src, step, scale = e24[:], 4, 10
	case "E12":
		src, step, scale = e24[:], 2, 10
	case "E24":
		src, step, scale = e24[:], 1, 10
	case "E48":
		src, step, scale = e192[:], 4, 100
	case "E96":
		src, step, scale = e192[:], 2, 100
	case "E192":
		src, step, scale = e192[:], 1, 100
	default:
		return nil, fmt.Errorf("unknown series %q (allowed: %s)", name, strings.Join(SeriesNames, ", "))
	}
	out := make([]float64, 0, len(src)/step)
	for i := 0; i < len(src); i += step {
		out = append(out, float64(src[i])/scale)
	}
	return out, nil
}

// Snap returns the value of series (mantissas in [1, 10), as Series gives)
// times a power of ten that is nearest to v on a logarithmic scale, so
// 9.6 kΩ snaps to 10 kΩ in E12, the next decade's first value. It panics
// if v is not positive and finite or series is empty.
func Snap(v float64, series []float64) float64 {
	if !(v > 0) || math.IsInf(v, 0) || len(series) == 0 {
		panic("hilbert: Snap needs a positive finite value and a series")
	}
	d := math.Floor(math.Log10(v))
	dec := math.Pow(10, d)
	// Candidates: the last value of the decade below, this decade's
	// values and the first of the decade above.
	best, bestErr := 0.0, math.Inf(1)
	try := func(c float64) {
		if e := math.Abs(math.Log(v / c)); e < bestErr {
			best, bestErr = c, e
		}
	}
	try(series[len(series)-1] * dec / 10)
	for _, m := range series {
		try(m * dec)
	}
	try(series[0] * dec * 10)
	// Products like 5.23·10⁴ miss the decimal value by a rounding; the
	// nearest float64 to the printed value is what a builder means.
	b, _ := strconv.ParseFloat(strconv.FormatFloat(best, 'g', 12, 64), 64)
	return b
}
