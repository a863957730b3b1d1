package expr

import (
	"bytes"
	"fmt"
	"math"
	"math/cmplx"
	"strconv"
	"strings"
	"unsafe"
)

// ShownKind says how a value was laid out.
type ShownKind int

// The layouts of a shown value.
const (
	ShownReal  ShownKind = iota // A
	ShownPolar                  // A∠B°
	ShownRect                   // A + jB (B carries its sign)
)

// Shown is a value laid out for the sheet: its number (in parts, so the
// renderer can typeset it) and its unit. Numbers use "-" for minus and may
// be in exponent form ("1.234e-15") when no SI prefix fits.
type Shown struct {
	Kind ShownKind
	A, B string
	Unit string
}

// String writes the value as text: "1.595∠-33.69° kA", "3.000 + j4.000 Ω",
// "36.87°".
func (s Shown) String() string {
	var num string
	switch s.Kind {
	case ShownReal:
		num = s.A
	case ShownPolar:
		num = s.A + "∠" + s.B + "°"
	case ShownRect:
		if s.A == "" {
			num = "j" + s.B
			if strings.HasPrefix(s.B, "-") {
				num = "-j" + s.B[1:]
			}
		} else if strings.HasPrefix(s.B, "-") {
			num = s.A + " - j" + s.B[1:]
		} else {
			num = s.A + " + j" + s.B
		}
	}
	switch {
	case s.Unit == "":
		return num
	case s.Unit == "°" || s.Unit == "%":
		if s.Unit == "%" {
			return num + " %"
		}
		return num + s.Unit
	}
	return num + " " + s.Unit
}

// engineering prefixes, by power of ten / 3 + 4
var engPrefix = []string{"p", "n", "µ", "m", "", "k", "M", "G", "T"}

// CheckDisplay reports an error when a display unit does not fit the
// value's dimension.
func CheckDisplay(v Value, d *Display) error {
	if d == nil || d.Unit == nil {
		return nil
	}
	check := func(s *Scalar) error {
		if s.Dim != d.Unit.Dim && !isPlainZero(s) {
			return fmt.Errorf("the unit %s is %s, but the value is %s", d.Unit.Text, dimWord(d.Unit.Dim), dimWord(s.Dim))
		}
		return checkTempDisplay(s, d.Unit)
	}
	switch x := v.(type) {
	case *Scalar:
		return check(x)
	case *Matrix:
		for i := range x.E {
			if err := check(&x.E[i]); err != nil {
				return fmt.Errorf("%s: %s", entryName(x, i/x.Cols, i%x.Cols), err.Error())
			}
		}
	}
	return nil
}

// FormatValue writes any value as text; a matrix as "[a, b; c, d]".
func FormatValue(v Value, d *Display, digits int) string {
	switch x := v.(type) {
	case *Scalar:
		return FormatScalar(x, d, digits).String() + x.Sense.Suffix()
	case *Matrix:
		x = DisplayMatrix(x)
		var b strings.Builder
		b.WriteByte('[')
		for i := 0; i < x.Rows; i++ {
			if i > 0 {
				b.WriteString("; ")
			}
			for j := 0; j < x.Cols; j++ {
				if j > 0 {
					b.WriteString(", ")
				}
				e := x.At(i, j)
				b.WriteString(FormatScalar(&e, d, digits).String() + e.Sense.Suffix())
			}
		}
		b.WriteByte(']')
		return b.String()
	}
	return ""
}

// DefaultForm is the form a value of dimension d is shown in: polar for
// voltages and currents, rectangular for the rest.
func DefaultForm(d Dim) Form {
	if d == DimVoltage || d == DimCurrent {
		return FormPolar
	}
	return FormRect
}

// FormatScalar lays a scalar out with digits significant figures, in the
// display unit and form of d (nil: the defaults of its dimension). A value
// whose imaginary part is negligible is shown as a real number unless d
// asks for a form.
func FormatScalar(s *Scalar, d *Display, digits int) Shown {
	digits = clampDigits(digits)
	if cmplx.IsNaN(s.Z) {
		return Shown{A: "NaN"}
	}
	c := chooseUnit(s, d, digits)
	if c.degrees {
		return Shown{Kind: ShownReal, A: fmtDegrees(real(s.Z)*180/math.Pi, digits), Unit: "°"}
	}
	z := (s.Z - complex(c.offset, 0)) / complex(c.scale, 0)
	form := c.form
	mag := cmplx.Abs(z)
	if form == -1 {
		mag = math.Abs(real(z))
	} else if form == FormRect {
		mag = math.Max(math.Abs(real(z)), math.Abs(imag(z)))
	}
	unit := c.unit
	switch form {
	case FormPolar:
		m := cmplx.Abs(z)
		deg := cmplx.Phase(z) * 180 / math.Pi
		if m == 0 {
			deg = 0
		}
		return Shown{Kind: ShownPolar, A: fmtNum(m, digits), B: fmtAngle(deg, digits), Unit: unit}
	case FormRect:
		var buf [40]byte
		_, e := eForm(buf[:], mag, digits)
		dec := decimalsOf(mag, digits, e)
		if expForm(mag, e, digits) {
			// exponent form, like a real number (fmtNum)
			return Shown{Kind: ShownRect, A: fmtNum(real(z), digits), B: fmtNum(imag(z), digits), Unit: unit}
		}
		sh := Shown{Kind: ShownRect, A: fmtFixed(real(z), dec), B: fmtFixed(imag(z), dec), Unit: unit}
		if math.Abs(real(z)) <= 1e-12*mag {
			sh.A = "" // purely imaginary: "-j318.3 Ω"
		}
		return sh
	}
	if unit == "°" && s.Angle {
		return Shown{Kind: ShownReal, A: fmtDegrees(real(z), digits), Unit: unit}
	}
	return Shown{Kind: ShownReal, A: fmtNum(real(z), digits), Unit: unit}
}

func clampDigits(digits int) int {
	return min(max(digits, 2), 15)
}

// unitChoice is how a value is shown: the unit written after it, the size
// of that unit (prefix included) in coherent SI units, and the form (-1:
// a real number); degrees marks an angle shown in degrees by default.
type unitChoice struct {
	unit    string
	scale   float64
	offset  float64 // value of 0 in the unit (°C: 273.15 K)
	form    Form
	degrees bool
}

// chooseUnit is the one decision of the unit a value is shown in, given
// the display its line or definition chose (ChooseDisplay: the line's
// bracket, the literal's unit, the document's preferred unit): that unit
// when it fits the value's dimension; else the default unit of the
// dimension (a power by its kind, IEEE 1459: W, var, VA) with the SI
// prefix that puts the number, rounded to digits, in [1, 1000).
func chooseUnit(s *Scalar, d *Display, digits int) unitChoice {
	c := unitChoice{scale: 1, form: FormAuto}
	if d != nil {
		c.form = d.Form
	}
	real0 := isRealZ(s.Z)
	if c.form == FormAuto {
		if real0 {
			c.form = -1
		} else {
			c.form = DefaultForm(s.Dim)
		}
	}
	if d != nil && d.Unit != nil && (d.Unit.Dim == s.Dim || isPlainZero(s)) && fitsKind(s, d.Unit) && (d.Unit.Offset == 0 || s.AbsTemp) {
		c.unit, c.scale, c.offset = d.Unit.Text, d.Unit.Scale, d.Unit.Offset
		switch c.unit {
		case "deg":
			c.unit = "°"
		case "degC":
			c.unit = "°C"
		}
		return c
	}
	if s.AbsTemp && s.Dim == DimTemperature {
		// an absolute temperature is shown in °C (temperature.go)
		c.unit, c.offset = "°C", CelsiusZero
		return c
	}
	if s.Dim.IsZero() && s.Angle && c.form == -1 {
		c.unit, c.scale, c.degrees = "°", math.Pi/180, true
		return c
	}
	base, pow, prefixable := defaultSymbol(s.Dim, s.Kind, !real0)
	c.unit = base
	if s.Dim == DimMass {
		c.scale = 1e-3 // shown in grams
	}
	z := s.Z / complex(c.scale, 0)
	mag := cmplx.Abs(z)
	if c.form == -1 {
		mag = math.Abs(real(z))
	} else if c.form == FormRect {
		mag = math.Max(math.Abs(real(z)), math.Abs(imag(z)))
	}
	if prefixable && mag != 0 && !math.IsInf(mag, 0) && !math.IsNaN(mag) {
		rm := roundSig(mag, digits)
		pf, f := choosePrefix(rm, pow)
		// Only a prefix that brings the number into [1, 1000) (for a unit
		// raised to pow, [1, 1000^pow)) is used: below pico and above tera
		// the value is shown in the base unit in exponent form, never as
		// "0.1000 pF" or "1.000e8 TV".
		if r := rm / f; (pf != "" || f != 1) && r >= 1-1e-12 && r < pow10(3*pow) {
			c.unit = pf + base
			c.scale *= f
		}
	}
	return c
}

// fitsKind reports whether a power may be shown in u: a power of a known
// kind only in the unit of that kind, a complex power only in VA (IEEE
// 1459). A display chosen for another value (the literal side of a check,
// say) never shows an active power in kVA.
func fitsKind(s *Scalar, u *Unit) bool {
	if s.Dim != DimPower || u.Kind == PowerNone {
		return true
	}
	if !s.IsReal() {
		return u.Kind == PowerApparent
	}
	return s.Kind == PowerNone || s.Kind == u.Kind
}

// DisplayUnit is the unit s is shown in with display d at digits
// significant figures (the same decision as FormatScalar), and the size of
// that unit in coherent SI units: phasor diagrams, plot axes and sweep
// tables scale their numbers by it.
//
// A unit with an offset (°C) is never returned here, since a number
// scaled by it alone would be wrong: an absolute temperature is given in
// K. DisplayUnitOffset gives °C with its offset.
func DisplayUnit(s *Scalar, d *Display, digits int) (unit string, scale float64) {
	unit, scale, offset := DisplayUnitOffset(s, d, digits)
	if offset != 0 {
		return "K", 1
	}
	return unit, scale
}

// DisplayUnitOffset is DisplayUnit with the offset of the unit: the
// number shown is (value − offset) / scale. The offset is 0 except for an
// absolute temperature shown in °C (273.15).
func DisplayUnitOffset(s *Scalar, d *Display, digits int) (unit string, scale, offset float64) {
	c := chooseUnit(s, d, clampDigits(digits))
	return c.unit, c.scale, c.offset
}

// defaultSymbol is the unit a dimension is shown in when its line names
// none, the power its prefix is raised to (m² takes prefixes in steps of
// 10⁶), and whether it takes an SI prefix. A power is shown in the unit of
// its kind (IEEE 1459): W, var or VA; a complex power in VA; a power of
// no kind in W.
func defaultSymbol(d Dim, kind PowerKind, complexValue bool) (sym string, pow int, prefixable bool) {
	switch d {
	case Dim{}:
		return "", 1, false
	case DimPower:
		if complexValue {
			return "VA", 1, true
		}
		return kind.Unit(), 1, true
	case DimArea:
		return "m²", 2, true
	case DimVolume:
		return "m³", 3, true
	}
	if u := CoherentUnit(d); u != "" {
		if d == DimMass {
			return "g", 1, true
		}
		return u, 1, true
	}
	if u, pre := compoundUnit(d); u != "" {
		return u, 1, pre
	}
	return d.SI(), 1, false
}

// choosePrefix picks the engineering prefix that puts mag in [1, 1000)
// (for a unit raised to pow, the largest prefix that keeps mag ≥ 1). mass
// is shown in g, so its coherent value (kg) is scaled by 1000 first by the
// caller's base symbol choice.
func choosePrefix(mag float64, pow int) (string, float64) {
	best := 4
	for k := 0; k < len(engPrefix); k++ {
		f := pow10(3 * (k - 4) * pow)
		if mag/f >= 1-1e-12 {
			best = k
		}
	}
	if mag < pow10(-12*pow) {
		best = 0
	}
	return engPrefix[best], pow10(3 * (best - 4) * pow)
}

// pow10Tab holds math.Pow(10, k) for k in [-maxPow10, maxPow10], the
// powers choosePrefix and the exponent-form tests ask for (a prefix of a
// unit cubed: 10^±36; digits: at most 10^15), so that the same values are
// read from a table rather than computed again for every number shown.
const maxPow10 = 48

var pow10Tab = func() (t [2*maxPow10 + 1]float64) {
	for k := range t {
		t[k] = math.Pow(10, float64(k-maxPow10))
	}
	return t
}()

// pow10 is math.Pow(10, k), from the table where k is in it.
func pow10(k int) float64 {
	if k < -maxPow10 || k > maxPow10 {
		return math.Pow(10, float64(k))
	}
	return pow10Tab[k+maxPow10]
}

// eForm writes x in exponent form with n significant figures (as
// strconv.FormatFloat(x, 'e', n-1, 64)) into buf and returns the text and
// its decimal exponent (0 when the text has none: Inf, NaN).
func eForm(buf []byte, x float64, n int) ([]byte, int) {
	s := strconv.AppendFloat(buf[:0], x, 'e', n-1, 64)
	i := bytes.IndexByte(s, 'e')
	if i < 0 || i+2 >= len(s) {
		return s, 0
	}
	e := 0
	for _, c := range s[i+2:] {
		e = e*10 + int(c-'0')
	}
	if s[i+1] == '-' {
		e = -e
	}
	return s, e
}

// expForm reports whether x, whose exponent form with n significant
// figures has the exponent e, is written in exponent form: when x rounded
// to n figures (r) is not 0 and r ≥ 1e6, r ≥ 10^n or r < 1e-3. The
// exponent decides each test without reading r back: r is d.dd…×10^e
// with 1 ≤ d.dd… < 10, so r ≥ 10^k exactly when e ≥ k, and r < 1e-3
// exactly when e ≤ -4; at n ≤ 15 figures the largest r below a threshold
// is at least 1e-15 of it below, more than two steps of a float64 (2.2e-16
// of it), so the float read back from r falls on the same side.
func expForm(x float64, e, n int) bool {
	switch {
	case x == 0 || math.IsNaN(x):
		return false
	case math.IsInf(x, 0):
		return true
	}
	return e >= 6 || e >= n || e <= -4
}

// parseSig reads back the text s that eForm wrote for x: x rounded to
// its significant figures.
func parseSig(x float64, s []byte) float64 {
	if x == 0 || math.IsInf(x, 0) || math.IsNaN(x) {
		return x
	}
	v, _ := strconv.ParseFloat(unsafe.String(unsafe.SliceData(s), len(s)), 64)
	return v
}

// decimalsOf is decimalsFor given the exponent e of x's exponent form.
func decimalsOf(x float64, n, e int) int {
	if x == 0 {
		return n - 1
	}
	return max(n-1-e, 0)
}

func roundSig(x float64, n int) float64 {
	if x == 0 || math.IsInf(x, 0) || math.IsNaN(x) {
		return x
	}
	var buf [40]byte
	s, _ := eForm(buf[:], x, n)
	return parseSig(x, s)
}

// decimalsFor is the number of decimals that shows mag with n significant
// figures (0 when mag needs more digits before the point than n).
func decimalsFor(mag float64, n int) int {
	var buf [40]byte
	_, e := eForm(buf[:], mag, n)
	return decimalsOf(mag, n, e)
}

func fmtFixed(x float64, dec int) string {
	s := strconv.FormatFloat(x, 'f', dec, 64)
	if strings.HasPrefix(s, "-") && strings.Trim(s[1:], "0.") == "" {
		s = s[1:]
	}
	return s
}

// fmtNum writes x with n significant figures, in exponent form outside
// [1e-3, 1e6) and wherever its whole part would need more than n digits
// (74364 at 4 digits is 7.436e4, never a number with more figures than
// the sheet shows).
func fmtNum(x float64, n int) string {
	if math.IsInf(x, 1) {
		return "∞"
	}
	if math.IsInf(x, -1) {
		return "-∞"
	}
	var buf [40]byte
	s, e := eForm(buf[:], x, n)
	if expForm(x, e, n) {
		// 1.234e-05 -> 1.234e-5
		i := bytes.IndexByte(s, 'e')
		out := strconv.AppendInt(append(s[:i:i], 'e'), int64(e), 10)
		return string(out)
	}
	// fixed notation with n significant figures (the exponent of |x| is
	// the exponent of x)
	return fmtFixed(x, decimalsOf(x, n, e))
}

// fmtDegrees writes an angle value in degrees with n significant figures;
// one that reads -180 is shown as 180 (angles are given in (-180°, 180°]).
func fmtDegrees(deg float64, n int) string {
	s := fmtNum(deg, n)
	if s == "-180" || strings.HasPrefix(s, "-180.") && strings.Trim(s[5:], "0") == "" {
		s = s[1:]
	}
	return s
}

// fmtAngle writes an angle in degrees in (-180, 180], with n significant
// figures but at most n-2 decimals, so that tiny angles read as 0.
func fmtAngle(deg float64, n int) string {
	if deg <= -180 {
		deg += 360
	}
	dec := decimalsFor(math.Abs(deg), n)
	if dec > n-2 {
		dec = n - 2
	}
	s := fmtFixed(deg, dec)
	if strings.Trim(s, "0.-") == "" {
		return "0"
	}
	if s == "-180" || strings.HasPrefix(s, "-180.") && strings.Trim(s[5:], "0") == "" {
		s = s[1:]
	}
	return s
}

// DisplayMatrix returns m with every part (real or imaginary) of an
// entry that is rounding residue set to zero: a part whose magnitude is
// at most the entry's residue bound m.Resid[i] (residue.go), the most by
// which the arithmetic that produced it can miss an exact 0. Entries with
// no bound (as written) are shown as they are; a genuine entry, however
// small beside the others (100 nS beside 1 MS), is never zeroed. The
// values themselves are not changed.
func DisplayMatrix(m *Matrix) *Matrix {
	out := &Matrix{Rows: m.Rows, Cols: m.Cols, E: append([]Scalar(nil), m.E...)}
	if m.Resid == nil {
		return out
	}
	for i, e := range out.E {
		tol := m.Resid[i]
		if !(tol > 0) || math.IsInf(tol, 0) {
			continue
		}
		re, im := real(e.Z), imag(e.Z)
		if math.Abs(re) <= tol {
			re = 0
		}
		if math.Abs(im) <= tol {
			im = 0
		}
		out.E[i].Z = complex(re, im)
	}
	return out
}
