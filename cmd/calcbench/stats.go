package main

import (
	"errors"
	"fmt"
	"math"
	"os"
	"sort"
	"strings"
	"time"
)

// Quantile returns the q-quantile (0 ≤ q ≤ 1) of xs by linear
// interpolation between order statistics: with the sorted values
// x_0 ≤ … ≤ x_{n−1} and h = q·(n−1), it is x_⌊h⌋ + (h − ⌊h⌋)·(x_⌊h⌋+1 − x_⌊h⌋)
// (Hyndman and Fan's definition 7, the default of NumPy's percentile and
// of R's quantile). The median is the 0.5-quantile: the middle value of
// an odd count, the mean of the two middle values of an even one. xs is
// not changed. An empty list, a NaN among the values or q outside [0, 1]
// is an error.
func Quantile(xs []float64, q float64) (float64, error) {
	if len(xs) == 0 {
		return 0, errors.New("quantile of no values")
	}
	if math.IsNaN(q) || q < 0 || q > 1 {
		return 0, fmt.Errorf("quantile %v: must be between 0 and 1", q)
	}
	s := append([]float64(nil), xs...)
	for _, x := range s {
		if math.IsNaN(x) {
			return 0, errors.New("quantile of values that include NaN")
		}
	}
	sort.Float64s(s)
	h := q * float64(len(s)-1)
	lo := int(math.Floor(h))
	if lo >= len(s)-1 {
		return s[len(s)-1], nil
	}
	return s[lo] + (h-float64(lo))*(s[lo+1]-s[lo]), nil
}

// Median is Quantile(xs, 0.5).
func Median(xs []float64) (float64, error) { return Quantile(xs, 0.5) }

// sample is one run of a child process: wall time from start to exit, CPU
// time (user + system) and the largest resident set size, in bytes, of the
// process and of the children it waited for (getrusage/wait4).
type sample struct {
	wall, cpu time.Duration
	rss       int64
}

// series is the samples of one program at one size.
type series []sample

func (s series) walls() []float64 {
	out := make([]float64, len(s))
	for i, x := range s {
		out[i] = x.wall.Seconds()
	}
	return out
}

func (s series) cpus() []float64 {
	out := make([]float64, len(s))
	for i, x := range s {
		out[i] = x.cpu.Seconds()
	}
	return out
}

func (s series) rsses() []float64 {
	out := make([]float64, len(s))
	for i, x := range s {
		out[i] = float64(x.rss)
	}
	return out
}

// summary is what the report prints of a series.
type summary struct {
	n                  int
	median, q1, q3     float64 // wall, seconds
	cpuMedian          float64 // seconds
	rssMedian, rssPeak float64 // bytes
}

func summarize(s series) (summary, error) {
	if len(s) == 0 {
		return summary{}, errors.New("no samples")
	}
	w := s.walls()
	out := summary{n: len(s)}
	var err error
	if out.median, err = Median(w); err != nil {
		return out, err
	}
	out.q1, _ = Quantile(w, 0.25)
	out.q3, _ = Quantile(w, 0.75)
	out.cpuMedian, _ = Median(s.cpus())
	r := s.rsses()
	out.rssMedian, _ = Median(r)
	out.rssPeak, _ = Quantile(r, 1)
	return out, nil
}

// ms formats seconds as milliseconds with three significant figures.
func ms(sec float64) string {
	v := sec * 1000
	switch {
	case v >= 100:
		return fmt.Sprintf("%.0f ms", v)
	case v >= 10:
		return fmt.Sprintf("%.1f ms", v)
	}
	return fmt.Sprintf("%.2f ms", v)
}

// mb formats bytes in megabytes (10⁶ bytes).
func mb(b float64) string { return fmt.Sprintf("%.1f MB", b/1e6) }

// loadAverage returns the system's 1, 5 and 15-minute load averages as
// /proc/loadavg gives them, or "unknown" where there is no such file.
func loadAverage() string {
	b, err := os.ReadFile("/proc/loadavg")
	if err != nil {
		return "unknown"
	}
	f := strings.Fields(string(b))
	if len(f) < 3 {
		return "unknown"
	}
	return strings.Join(f[:3], " ")
}
