package svg

import (
	"math"
	"strconv"
	"strings"
)

// maxLinearIntervals is the largest number of tick intervals a linear axis
// range is divided into.
const maxLinearIntervals = 8

// maxDecadeTicks is the largest number of decade ticks on a logarithmic axis
// before only every 2nd, 5th, 10th, ... decade is ticked.
const maxDecadeTicks = 10

// Ticks returns the major tick positions chosen for an axis from min to max,
// in increasing order, all within [min, max].
//
// Linear axis (log false): the step is s = d·10^e, d ∈ {1, 2, 5}, the
// smallest such number with (max − min)/s ≤ 8; the ticks are the multiples
// k·s with min ≤ k·s ≤ max, each computed as (k·d)·10^e so that round values
// are exact decimals (0.3, not 0.30000000000000004).
//
// Logarithmic axis (log true, min > 0): the ticks are the decades 10^k in
// [min, max]. When there are more than 10 of them, only the decades whose
// exponent is a multiple of n are kept, n the smallest of 2, 5, 10, 20, 50,
// ... that leaves at most 10. When fewer than two decades lie in the range,
// the ticks are the numbers 1·10^k, 2·10^k and 5·10^k in the range instead,
// and when fewer than two of those lie in it, the linear ticks of the range.
//
// min == max gives the single tick min. Ticks returns nil when min or max is
// not finite, min > max, log is true and min ≤ 0, |min| or |max| exceeds
// 1e280 or (log true) min is below 1e-280, or min < max but the range is
// too narrow to tick: max − min < 1e-280, or max − min ≤ 1e-12·max(|min|,
// |max|) (below the resolution of float64 near the ends).
func Ticks(min, max float64, log bool) []float64 {
	if !finite(min) || !finite(max) || min > max || (log && min <= 0) {
		return nil
	}
	if math.Abs(min) > maxMagnitude || math.Abs(max) > maxMagnitude || (log && min < minPositive) {
		return nil
	}
	if min == max {
		return []float64{min}
	}
	if max-min < minPositive || max-min <= 1e-12*math.Max(math.Abs(min), math.Abs(max)) {
		return nil
	}
	if !log {
		t, _, _ := linearTicks(min, max)
		return t
	}
	major, _, _, _ := logTicks(min, max)
	return major
}

// linearStep returns the tick step for a linear range as (d, e): the smallest
// d·10^e ≥ (max − min)/8.
func linearStep(min, max float64) (int, int) {
	return niceCeil((max - min) / maxLinearIntervals)
}

// linearTicks returns the linear ticks of [min, max] (min < max) and the
// step (d, e) they use.
func linearTicks(min, max float64) ([]float64, int, int) {
	d, e := linearStep(min, max)
	s := val125(d, e)
	// A relative tolerance on the index range lets a tick that lies exactly
	// on an end survive the rounding of min/s and max/s; the exact range
	// check below then decides.
	kLo := math.Ceil(min/s - 1e-9)
	kHi := math.Floor(max/s + 1e-9)
	var ticks []float64
	// kHi − kLo is at most 8 plus rounding; the count bounds the loop for
	// any input regardless.
	for k, n := kLo, 0; k <= kHi && n <= 4*maxLinearIntervals; k, n = k+1, n+1 {
		t := multiple(k, d, e)
		if t < min || t > max {
			continue
		}
		if n := len(ticks); n > 0 && ticks[n-1] == t {
			continue
		}
		ticks = append(ticks, t)
	}
	return ticks, d, e
}

// multiple returns k·d·10^e with a single rounding where k·d is exact.
func multiple(k float64, d, e int) float64 {
	kd := k * float64(d)
	if e < 0 {
		return kd / math.Pow10(-e)
	}
	return kd * math.Pow10(e)
}

// decadeFloor returns the largest integer k with 10^k ≤ x (x > 0).
func decadeFloor(x float64) int {
	k := int(math.Floor(math.Log10(x)))
	for val125(1, k) > x {
		k--
	}
	for val125(1, k+1) <= x {
		k++
	}
	return k
}

// logTicks returns the major ticks of a logarithmic range (0 < min < max) as
// documented on Ticks, and the minor marks: 2·10^k and 5·10^k in the range,
// given only when every decade is a major tick. When the range is too narrow
// for 1-2-5 marks, linear is true and e is the exponent of the linear step.
func logTicks(min, max float64) (major, minor []float64, linear bool, e int) {
	k0 := decadeFloor(min)
	if val125(1, k0) < min {
		k0++
	}
	k1 := decadeFloor(max)
	if k1-k0+1 >= 2 {
		var stride int
		for sd, se := 1, 0; ; sd, se = next125(sd, se) {
			n := int(val125(sd, se))
			if countMultiples(k0, k1, n) <= maxDecadeTicks {
				stride = n
				break
			}
		}
		for k := k0; k <= k1; k++ {
			if k%stride == 0 {
				major = append(major, val125(1, k))
			}
		}
		if stride == 1 {
			for k := k0 - 1; k <= k1; k++ {
				for _, d := range []int{2, 5} {
					v := val125(d, k)
					if v >= min && v <= max {
						minor = append(minor, v)
					}
				}
			}
		}
		return major, minor, false, 0
	}
	// Fewer than two decades: 1-2-5 marks.
	d, de := niceCeil(min)
	for v := val125(d, de); v <= max; v = val125(d, de) {
		major = append(major, v)
		d, de = next125(d, de)
	}
	if len(major) >= 2 {
		return major, nil, false, 0
	}
	t, _, le := linearTicks(min, max)
	return t, nil, true, le
}

// countMultiples returns how many integers in [k0, k1] are multiples of n.
func countMultiples(k0, k1, n int) int {
	c := 0
	for k := k0; k <= k1; k++ {
		if k%n == 0 {
			c++
		}
	}
	return c
}

// siPrefixes are the SI prefixes from pico to tera (SI Brochure, 9th ed.,
// Table 7), indexed by (exponent + 12)/3.
var siPrefixes = []string{"p", "n", "µ", "m", "", "k", "M", "G", "T"}

// prefixExp returns the exponent 3n (−12 ≤ 3n ≤ 12) of the SI prefix for a
// value of magnitude a: the largest 3n ≤ log10(a), clamped to the range of
// siPrefixes; 0 for a == 0.
func prefixExp(a float64) int {
	if a == 0 {
		return 0
	}
	k := decadeFloor(a)
	p := k - ((k%3)+3)%3
	if p < -12 {
		p = -12
	}
	if p > 12 {
		p = 12
	}
	return p
}

// siLabel writes v/10^p with the given number of decimals followed by the
// SI prefix of 10^p; zero is written "0", and a value that rounds to zero
// is written without a minus sign.
func siLabel(v float64, p, decimals int) string {
	var m float64
	if p < 0 {
		m = v * math.Pow10(-p)
	} else {
		m = v / math.Pow10(p)
	}
	if v == 0 {
		return "0"
	}
	s := strconv.FormatFloat(m, 'f', decimals, 64)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-")
	}
	return s + siPrefixes[(p+12)/3]
}

// linearLabels labels linear ticks with step d·10^e: one SI prefix for the
// whole axis, chosen from the largest tick magnitude, and the number of
// decimals the step needs under that prefix.
func linearLabels(ticks []float64, e int) []string {
	var big float64
	for _, t := range ticks {
		big = math.Max(big, math.Abs(t))
	}
	if big != 0 && outsidePrefixes(big) {
		return eLabels(ticks)
	}
	p := prefixExp(big)
	dec := p - e
	if dec < 0 {
		dec = 0
	}
	out := make([]string, len(ticks))
	for i, t := range ticks {
		out[i] = siLabel(t, p, dec)
	}
	return out
}

// logLabels labels ticks of a logarithmic axis, each with its own SI prefix
// ("10", "100", "1k", "10k"); the ticks are d·10^k numbers.
func logLabels(ticks []float64) []string {
	out := make([]string, len(ticks))
	for i, t := range ticks {
		if outsidePrefixes(t) {
			out[i] = eLabels([]float64{t})[0]
			continue
		}
		p := prefixExp(t)
		k := decadeFloor(t)
		dec := p - k
		if dec < 0 {
			dec = 0
		}
		out[i] = siLabel(t, p, dec)
	}
	return out
}

// outsidePrefixes reports whether a magnitude a > 0 lies outside what the
// prefixes p to T write with at most three integer digits: below 1e-12 or
// at or above 1e15.
func outsidePrefixes(a float64) bool {
	k := decadeFloor(a)
	return k < -12 || k > 14
}

// eLabels writes each value in the shortest E notation that reads back as
// the same float64 ("2e+279", "1.5e-13"); zero is written "0".
func eLabels(ticks []float64) []string {
	out := make([]string, len(ticks))
	for i, t := range ticks {
		if t == 0 {
			out[i] = "0"
			continue
		}
		out[i] = strconv.FormatFloat(t, 'e', -1, 64)
	}
	return out
}
