package expr

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"
)

// Expected values here are worked by hand (arithmetic, the definitions of
// LANGUAGE §3 and §4, and the SI unit definitions of the SI Brochure, 9th
// edition, 2019), written as Go constants or as math/math.cmplx calls on
// the same inputs.

var (
	dimOne     = Dim{}
	dimPerM2   = Dim{-2, 0, 0, 0, 0, 0, 0}
	dimPerM    = Dim{-1, 0, 0, 0, 0, 0, 0}
	dimPerV    = DimVoltage.Pow(-1)
	dimAccel   = Dim{1, 0, -2, 0, 0, 0, 0}
	dimOhmM    = DimImpedance.Mul(DimLength)
	dimOhmPerM = DimImpedance.Div(DimLength)
	dimOhm2    = DimImpedance.Pow(2)
	dimSpecHt  = Dim{2, 0, -2, 0, -1, 0, 0} // J/(kg·K)
)

const deg = math.Pi / 180

func TestOperators(t *testing.T) {
	tests := []struct {
		name string
		src  string
		want complex128
		dim  Dim
	}{
		{"add", "2 V + 3 V", 5, DimVoltage},
		{"subtract", "5 A - 2 A", 3, DimCurrent},
		{"V times A is W", "2 V * 3 A", 6, DimPower},
		{"V over A is Ω", "6 V / 2 A", 3, DimImpedance},
		{"parallel real", "3 Ω ∥ 6 Ω", 2, DimImpedance},                               // 3·6/(3+6)
		{"parallel complex", "(1 + j) Ω || (1 - j) Ω", 1, DimImpedance},               // (1+j)(1-j)/2 = 2/2
		{"parallel of zero", "0 Ω ∥ 5 Ω", 0, DimImpedance},                            // 0·5/5
		{"polar", "2 ∠ 90°", cmplx.Rect(2, math.Pi/2), dimOne},                        // 2(cos 90° + j sin 90°)
		{"polar with units", "230 V∠-120°", cmplx.Rect(230, -120*deg), DimVoltage},    //
		{"phasor unit after angle", "16∠-40° A", cmplx.Rect(16, -40*deg), DimCurrent}, // LANGUAGE §3
		{"polar ascii", "5 V/_30°", cmplx.Rect(5, 30*deg), DimVoltage},
		{"polar radians", "2∠0.5 rad", cmplx.Rect(2, 0.5), dimOne},
		{"polar of expression", "phi = 10°\nV_1 = 2 V\nV_1 ∠ (phi + 30°)", cmplx.Rect(2, 40*deg), DimVoltage},
		{"square of a length", "(2 m)^2", 4, DimArea},
		{"inverse of a length", "(2 m)^-1", 0.5, dimPerM},
		{"square root of an area by ^", "(4 m^2)^0.5", 2, DimLength},
		{"real power", "2^0.5", complex(math.Sqrt2, 0), dimOne},
		{"j squared", "j^2", -1, dimOne},
		{"j cubed", "j^3", -1i, dimOne},
		{"unary minus looser than ^", "-2^2", -4, dimOne},
		{"^ right to left", "2^3^2", 512, dimOne},
		{"^ signed exponent", "10^-3", 0.001, dimOne},
		{"negative base complex power", "(-8)^(1/3)", cmplx.Pow(-8, complex(1.0/3, 0)), dimOne},
		{"negate", "-3 V", -3, DimVoltage},
		{"unary plus", "+3 V", 3, DimVoltage},
		{"abs bars", "|3 + j4|", 5, dimOne},
		{"abs bars keep the unit", "|-3 V + j4 V|", 5, DimVoltage},
		{"plain zero plus a voltage", "0 + 3 V", 3, DimVoltage},
		{"voltage minus plain zero", "3 V - 0", 3, DimVoltage},
		{"1/2 A is 1/(2 A)", "1/2 A", 0.5, DimCurrent.Pow(-1)},
		{"divide by a unit", "x = 5 V\nx / (1 V)", 5, dimOne},
		{"unit names are free as names", "V = 2\nA = 3\nS = V*A\nS", 6, dimOne},
		{"product of phasors", "(2∠30°) * (3∠60°)", cmplx.Rect(6, 90*deg), dimOne},
		{"quotient of phasors", "(6 V∠30°) / (3 A∠-30°)", cmplx.Rect(2, 60*deg), DimImpedance},
		{"unit on a parenthesis", "(0.12 + j0.08) Ω", 0.12 + 0.08i, DimImpedance},
		{"imaginary literal with exponent", "j1e3", 1000i, dimOne},
		{"negative imaginary literal", "-j0.5", -0.5i, dimOne},
		{"user function", "derate(x) = 0.87 * x\nderate(10 A)", 8.7, DimCurrent},
		{"user function of two", "f(a, b) = a*b + 1 W\nf(2 V, 3 A)", 7, DimPower},
		{"function calls function", "f(x) = 2*x\ng(x) = f(x) + 1\ng(3)", 7, dimOne},
		{"pi", "pi", math.Pi, dimOne},
		{"π", "2*π", 2 * math.Pi, dimOne},
		{"j constant", "3 + 4*j", 3 + 4i, dimOne},
		{"continued line", "x = (1 +\n  2)\nx", 3, dimOne},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := evalScalar(t, tc.src)
			if !closeZ(s.Z, tc.want, 1e-14, 1e-300) {
				t.Errorf("%q = %v, want %v", tc.src, s.Z, tc.want)
			}
			if s.Dim != tc.dim {
				t.Errorf("%q: dimension %v, want %v", tc.src, s.Dim, tc.dim)
			}
		})
	}
}

// TestUnits: the unit table and the reading rule of units.go, "whole
// symbol first, then prefix + symbol", with values from the SI Brochure,
// 9th edition (2019): tables 2 and 4 (base and derived units), table 7
// (prefixes) and table 8 (minute, hour, degree), and LANGUAGE §4 (%, pu,
// VA and var, Wh).
func TestUnits(t *testing.T) {
	tests := []struct {
		name string
		src  string
		want float64
		dim  Dim
	}{
		{"volt", "1 V", 1, DimVoltage},
		{"kilovolt", "1 kV", 1e3, DimVoltage},
		{"milliampere", "1 mA", 1e-3, DimCurrent},
		{"microfarad", "4.7 µF", 4.7e-6, DimCapacitance},
		{"micro ASCII u", "1 uF", 1e-6, DimCapacitance},
		{"micro Greek mu", "1 μF", 1e-6, DimCapacitance},
		{"ohm", "1 Ω", 1, DimImpedance},
		{"ohm spelled", "1 ohm", 1, DimImpedance},
		{"ohm sign U+2126", "1 \u2126", 1, DimImpedance},
		{"kilo-ohm spelled", "2 kohm", 2e3, DimImpedance},
		{"ohm per km", "1 Ω/km", 1e-3, dimOhmPerM},
		{"resistivity", "0.0175 Ω·mm²/m", 0.0175e-6, dimOhmM},
		{"area mm^2", "16 mm^2", 16e-6, DimArea},
		{"area mm²", "16 mm²", 16e-6, DimArea},
		{"volume", "2 m³", 2, DimVolume},
		{"acceleration", "9.81 m/s^2", 9.81, dimAccel},
		{"negative power", "1 m^-2", 1, dimPerM2},
		{"every symbol after / is in the denominator", "1 J/kg·K", 1, dimSpecHt},
		{"kilogram", "1 kg", 1, DimMass},
		{"gram", "1 g", 1e-3, DimMass},
		{"percent", "5 %", 0.05, dimOne},
		{"per-unit", "0.9 pu", 0.9, dimOne},
		{"degree", "30 deg", 30 * deg, dimOne},
		{"degree sign", "30°", 30 * deg, dimOne},
		{"radian", "0.5 rad", 0.5, dimOne},
		{"milliradian", "5 mrad", 5e-3, dimOne},
		{"minute", "1 min", 60, DimTime},
		{"hour", "1 h", 3600, DimTime},
		{"watt-hour", "1 Wh", 3600, DimEnergy},
		{"kilowatt-hour", "1 kWh", 3.6e6, DimEnergy},
		{"volt-ampere", "1 kVA", 1e3, DimPower},
		{"var", "1 Mvar", 1e6, DimPower},
		{"hertz", "50 Hz", 50, DimFrequency},
		{"siemens", "2 mS", 2e-3, DimAdmittance},
		{"henry", "3 mH", 3e-3, DimInductance},
		{"weber", "1 Wb", 1, DimFlux},
		{"tesla", "1 T", 1, DimFluxDensity},
		{"newton", "1 kN", 1e3, DimForce},
		{"pascal", "1 Pa", 1, DimPressure},
		{"joule", "1 MJ", 1e6, DimEnergy},
		{"coulomb", "1 C", 1, DimCharge},
		{"kelvin", "1 K", 1, DimTemperature},
		{"mole", "1 mol", 1, DimAmount},
		{"candela", "1 cd", 1, DimLuminous},
		// whole symbol first: these are not prefix + symbol
		{"min is the minute, not milli-in", "2 min", 120, DimTime},
		{"Pa is the pascal, not peta-a", "2 Pa", 2, DimPressure},
		{"cd is the candela, not centi-d", "2 cd", 2, DimLuminous},
		{"h is the hour, not hecto", "2 h", 7200, DimTime},
		{"T is the tesla, not tera", "2 T", 2, DimFluxDensity},
		{"pu is per-unit, not pico-u", "2 pu", 2, dimOne},
		// then prefix + symbol
		{"mm is the millimetre", "2 mm", 2e-3, DimLength},
		{"ms is the millisecond", "2 ms", 2e-3, DimTime},
		{"mT is the millitesla", "2 mT", 2e-3, DimFluxDensity},
		{"da is deca, not deci-a", "1 daN", 10, DimForce},
		{"mcd", "1 mcd", 1e-3, DimLuminous},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := evalScalar(t, tc.src)
			if !closeZ(s.Z, complex(tc.want, 0), 1e-15, 1e-300) {
				t.Errorf("%q = %v, want %v", tc.src, s.Z, tc.want)
			}
			if s.Dim != tc.dim {
				t.Errorf("%q: dimension %v, want %v", tc.src, s.Dim, tc.dim)
			}
		})
	}
}

func TestAngleMark(t *testing.T) {
	// LANGUAGE §3: an angle is a dimensionless number in radians; arg and
	// the inverse trigonometric functions return angles, shown in degrees.
	tests := []struct {
		name  string
		src   string
		angle bool
	}{
		{"degree literal", "30°", true},
		{"sum of angles", "30° + 15°", true},
		{"angle times number", "2 * 30°", true},
		{"angle over number", "30° / 2", true},
		{"angle times angle is not an angle", "30° * 30°", false},
		{"arg", "arg(j)", true},
		{"asin", "asin(0.5)", true},
		{"acos", "acos(0.5)", true},
		{"atan", "atan(1)", true},
		{"atan2", "atan2(1 V, 1 V)", true},
		{"sin of an angle is a number", "sin(30°)", false},
		{"plain number", "0.5", false},
		{"negated angle", "-30°", true},
		{"name holding an angle", "phi = 30°\nphi", true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if s := evalScalar(t, tc.src); s.Angle != tc.angle {
				t.Errorf("%q: Angle = %v, want %v", tc.src, s.Angle, tc.angle)
			}
		})
	}
}

func TestBuiltinFunctions(t *testing.T) {
	e := math.E
	tests := []struct {
		name string
		src  string
		want complex128
		dim  Dim
	}{
		{"re", "re(3 V + j4 V)", 3, DimVoltage},
		{"im", "im(3 V + j4 V)", 4, DimVoltage},
		{"abs", "abs(3 A + j4 A)", 5, DimCurrent},
		{"arg", "arg(j)", math.Pi / 2, dimOne},
		{"arg of a negative real is +π", "arg(-1)", math.Pi, dimOne},
		{"arg of a product with a negative real", "arg(-2*2)", math.Pi, dimOne},
		{"arg with unit", "arg(1 V∠-30°)", -30 * deg, dimOne},
		{"conj", "conj(3 Ω + j4 Ω)", 3 - 4i, DimImpedance},
		{"sqrt of a square", "sqrt(16 mm^2)", 4e-3, DimLength},
		{"sqrt halves exponents", "sqrt(100 W * 1 Ω)", 10, DimVoltage}, // W·Ω = V²
		{"sqrt of a negative number is +j", "sqrt(-4)", 2i, dimOne},
		{"sqrt of a quotient with a negative real", "sqrt(4/(-1))", 2i, dimOne},
		{"sqrt complex", "sqrt(3 + j4)", 2 + 1i, dimOne},
		{"exp", "exp(1)", complex(e, 0), dimOne},
		{"exp of j pi", "exp(j*pi)", cmplx.Exp(complex(0, math.Pi)), dimOne},
		{"ln", "ln(exp(2))", 2, dimOne},
		{"ln of a negative number is +jπ", "ln(-1)", complex(0, math.Pi), dimOne},
		{"log10", "log10(1000)", 3, dimOne},
		{"log10 of a ratio", "log10(1 kV / 1 V)", 3, dimOne},
		{"sin of degrees", "sin(30°)", complex(math.Sin(30*deg), 0), dimOne},
		{"cos of degrees", "cos(60°)", complex(math.Cos(60*deg), 0), dimOne},
		{"tan of degrees", "tan(45°)", complex(math.Tan(45*deg), 0), dimOne},
		{"asin", "asin(0.5)", complex(math.Asin(0.5), 0), dimOne},
		{"acos", "acos(0.5)", complex(math.Acos(0.5), 0), dimOne},
		{"atan", "atan(1)", math.Pi / 4, dimOne},
		{"atan2 second quadrant", "atan2(1 V, -1 V)", 3 * math.Pi / 4, dimOne},
		{"atan2 plain", "atan2(-1, 0)", -math.Pi / 2, dimOne},
		{"sinh", "sinh(1)", complex((e-1/e)/2, 0), dimOne},
		{"cosh", "cosh(1)", complex((e+1/e)/2, 0), dimOne},
		{"tanh", "tanh(1)", complex((e-1/e)/(e+1/e), 0), dimOne},
		{"polar", "polar(2, 90°)", cmplx.Rect(2, math.Pi/2), dimOne},
		{"polar with unit", "polar(230 V, -120°)", cmplx.Rect(230, -120*deg), DimVoltage},
		{"min", "min(3 V, 1 V, 2 V)", 1, DimVoltage},
		{"max", "max(3 V, 1 V, 2 V)", 3, DimVoltage},
		{"max with plain zero", "max(0, -2 A)", 0, dimOne},
		{"min of a vector", "min([3; 1; 2])", 1, dimOne},
		{"max of one", "max(7 Hz)", 7, DimFrequency},
		{"det", "det([1, 2; 3, 4])", -2, dimOne},
		{"det with units", "det([1 Ω, 2 Ω; 3 Ω, 4 Ω])", -2, dimOhm2},
		{"det of singular", "det([1, 2; 2, 4])", 0, dimOne},
		{"det of mixed row and column units", "det([1 V, 2 V*A; 3, 4 A])", 1*4 - 2*3, DimVoltage.Mul(DimCurrent)},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := evalScalar(t, tc.src)
			if !closeZ(s.Z, tc.want, 1e-14, 1e-15) {
				t.Errorf("%q = %v, want %v", tc.src, s.Z, tc.want)
			}
			if s.Dim != tc.dim {
				t.Errorf("%q: dimension %v, want %v", tc.src, s.Dim, tc.dim)
			}
		})
	}
}

// wantMatrix is an expected matrix: entries and one dimension for all
// entries (or per entry when dims is not nil).
type wantMatrix struct {
	rows, cols int
	z          []complex128
	dim        Dim
	dims       []Dim
}

func checkMatrix(t *testing.T, src string, m *Matrix, w wantMatrix, rel float64) {
	t.Helper()
	if m.Rows != w.rows || m.Cols != w.cols {
		t.Fatalf("%q: shape %d×%d, want %d×%d", src, m.Rows, m.Cols, w.rows, w.cols)
	}
	for i, e := range m.E {
		if !closeZ(e.Z, w.z[i], rel, 1e-15) {
			t.Errorf("%q: entry %d = %v, want %v", src, i+1, e.Z, w.z[i])
		}
		d := w.dim
		if w.dims != nil {
			d = w.dims[i]
		}
		if e.Dim != d {
			t.Errorf("%q: entry %d dimension %v, want %v", src, i+1, e.Dim, d)
		}
	}
}

func TestMatrices(t *testing.T) {
	a := cmplx.Rect(1, 120*deg) // Fortescue's operator
	tests := []struct {
		name string
		src  string
		want wantMatrix
	}{
		{"product", "[1, 2; 3, 4] * [5; 6]", wantMatrix{2, 1, []complex128{17, 39}, dimOne, nil}},
		{"product of matrices", "[1, 2; 3, 4] * [0, 1; 1, 0]", wantMatrix{2, 2, []complex128{2, 1, 4, 3}, dimOne, nil}},
		{"Ohm's law for a vector", "[1 Ω, 2 Ω; 3 Ω, 4 Ω] * [1 A; 1 A]", wantMatrix{2, 1, []complex128{3, 7}, DimVoltage, nil}},
		{"sum", "[1, 2; 3, 4] + [1, 1; 1, 1]", wantMatrix{2, 2, []complex128{2, 3, 4, 5}, dimOne, nil}},
		{"difference", "[1 V, 2 A] - [1 V, 1 A]", wantMatrix{1, 2, []complex128{0, 1}, Dim{}, []Dim{DimVoltage, DimCurrent}}},
		{"scalar times vector", "2 * [1; 2]", wantMatrix{2, 1, []complex128{2, 4}, dimOne, nil}},
		{"vector times quantity", "[1; 2] * 2 V", wantMatrix{2, 1, []complex128{2, 4}, DimVoltage, nil}},
		{"vector over quantity", "[1; 2] / 2 V", wantMatrix{2, 1, []complex128{0.5, 1}, dimPerV, nil}},
		{"negated", "-[1; -j2]", wantMatrix{2, 1, []complex128{-1, 2i}, dimOne, nil}},
		{"unit on a parenthesised matrix", "([1, 2]) kV", wantMatrix{1, 2, []complex128{1e3, 2e3}, DimVoltage, nil}},
		{"inverse", "inv([2, 0; 0, 4])", wantMatrix{2, 2, []complex128{0.5, 0, 0, 0.25}, dimOne, nil}},
		{"inverse of impedances is admittances", "inv([2 Ω, 1 Ω; 1 Ω, 2 Ω])", wantMatrix{2, 2, []complex128{2.0 / 3, -1.0 / 3, -1.0 / 3, 2.0 / 3}, DimAdmittance, nil}},
		{"inverse complex", "inv([j, 0; 0, 2])", wantMatrix{2, 2, []complex128{-1i, 0, 0, 0.5}, dimOne, nil}},
		{"transpose of a row", "transpose([1, 2, 3])", wantMatrix{3, 1, []complex128{1, 2, 3}, dimOne, nil}},
		{"transpose of a matrix", "transpose([1, 2; 3, 4])", wantMatrix{2, 2, []complex128{1, 3, 2, 4}, dimOne, nil}},
		{"diag of a vector", "diag([1 Ω; 2 Ω])", wantMatrix{2, 2, []complex128{1, 0, 0, 2}, DimImpedance, nil}},
		{"diag of a matrix", "diag([1, 2; 3, 4])", wantMatrix{2, 1, []complex128{1, 4}, dimOne, nil}},
		{"abs entry by entry", "abs([3 + j4; -1])", wantMatrix{2, 1, []complex128{5, 1}, dimOne, nil}},
		{"re entry by entry", "re([3 + j4; -1])", wantMatrix{2, 1, []complex128{3, -1}, dimOne, nil}},
		{"im entry by entry", "im([3 + j4; -1])", wantMatrix{2, 1, []complex128{4, 0}, dimOne, nil}},
		{"conj entry by entry", "conj([3 + j4; -1])", wantMatrix{2, 1, []complex128{3 - 4i, -1}, dimOne, nil}},
		// Fortescue's transformation with a = 1∠120° (LANGUAGE, "Vectors and matrices")
		{"seq of three values", "seq(1 V, 0, 0)", wantMatrix{3, 1, []complex128{1.0 / 3, 1.0 / 3, 1.0 / 3}, DimVoltage, nil}},
		{"seq of a vector", "seq([0; 1; 0])", wantMatrix{3, 1, []complex128{1.0 / 3, a / 3, a * a / 3}, dimOne, nil}},
		{"abc", "abc(0, 1, 0)", wantMatrix{3, 1, []complex128{1, a * a, a}, dimOne, nil}},
		{"abc of zero sequence", "abc(2 A, 0, 0)", wantMatrix{3, 1, []complex128{2, 2, 2}, DimCurrent, nil}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			checkMatrix(t, tc.src, evalMatrix(t, tc.src), tc.want, 1e-14)
		})
	}
}

func TestIndexAndMultiAssign(t *testing.T) {
	tests := []struct {
		name string
		src  string
		want complex128
		dim  Dim
	}{
		{"entry of a matrix", "M = [1, 2; 3, 4]\nM(2, 1)", 3, dimOne},
		{"entry of a vector", "v = [5 V; 6 V; 7 V]\nv(3)", 7, DimVoltage},
		{"entry of a row", "r = [5, 6, 7]\nr(2)", 6, dimOne},
		{"index by expression", "v = [5; 6; 7]\nk = 1\nv(k + 1)", 6, dimOne},
		{"multi-name assignment", "V_0, V_1, V_2 = [1 V; 2 V; 3 V]\nV_1", 2, DimVoltage},
		{"multi-name assignment of seq", "I_0, I_1, I_2 = seq(3 A, 0, 0)\nI_2", 1, DimCurrent},
		{"multi-name assignment of a row", "a, b = [1 Ω, 2 Ω]\nb", 2, DimImpedance},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := evalScalar(t, tc.src)
			if !closeZ(s.Z, tc.want, 1e-14, 1e-15) || s.Dim != tc.dim {
				t.Errorf("%q = %v %v, want %v %v", tc.src, s.Z, s.Dim, tc.want, tc.dim)
			}
		})
	}
}

// TestDimensionRules: the rules of LANGUAGE §3 and §4 that refuse a
// result: + - ∥ and comparisons want equal dimensions (a plain 0 matches
// any), ∠ wants a real angle and a real magnitude, exp/ln/trig want plain
// numbers, sqrt refuses odd exponents, ^ wants a plain exponent.
func TestDimensionRules(t *testing.T) {
	tests := []struct {
		name, src, pos, msg string
	}{
		{"add", "3 V + 2 A", "1:5", "cannot add 3 V and 2 A: the units differ"},
		{"subtract", "3 V - 2 A", "1:5", "cannot subtract 3 V and 2 A: the units differ"},
		{"a unit zero is not a plain zero", "3 V - 0 A", "1:5", "the units differ"},
		{"parallel", "3 Ω ∥ 2 A", "1:5", "cannot combine in parallel 3 Ω and 2 A: the units differ"},
		{"compare", "check 3 V < 2 A", "1:13", "cannot compare 3 V with 2 A: the units differ"},
		{"angle with a unit", "1 ∠ 2 V", "1:5", "the angle after ∠ must be an angle"},
		{"complex angle", "1 ∠ (j) rad", "1:5", "the angle after ∠ must be real"},
		{"complex magnitude", "(1 + j) ∠ 30°", "1:1", "the magnitude before ∠ must be real"},
		{"sqrt of an odd exponent", "sqrt(2 V)", "1:1", "sqrt: the square root of a voltage has no unit"},
		{"sqrt of a length", "sqrt(4 m)", "1:1", "exponents of m are not all even"},
		{"fractional power of a length", "(2 m)^0.5", "1:7", "cannot raise a length to the power 0.5"},
		{"exponent with a unit", "2^(1 V)", "1:3", "an exponent must be a plain number"},
		{"complex power of a quantity", "(2 V)^j", "1:7", "can only be raised to a real power"},
		{"exp", "exp(1 V)", "1:1", "exp: needs a plain number or an angle, not 1 V"},
		{"ln", "ln(2 Ω)", "1:1", "ln: needs a plain number"},
		{"log10", "log10(2 W)", "1:1", "log10: needs a plain number"},
		{"sin", "sin(1 V)", "1:1", "sin: needs a plain number"},
		{"cos", "cos(1 A)", "1:1", "cos: needs a plain number"},
		{"tan", "tan(1 s)", "1:1", "tan: needs a plain number"},
		{"asin", "asin(1 m)", "1:1", "asin: needs a plain number"},
		{"acos", "acos(1 m)", "1:1", "acos: needs a plain number"},
		{"atan", "atan(1 m)", "1:1", "atan: needs a plain number"},
		{"sinh", "sinh(1 Hz)", "1:1", "sinh: needs a plain number"},
		{"cosh", "cosh(1 Hz)", "1:1", "cosh: needs a plain number"},
		{"tanh", "tanh(1 Hz)", "1:1", "tanh: needs a plain number"},
		{"atan2 of different units", "atan2(1 V, 1 A)", "1:1", "atan2: both arguments need the same unit"},
		{"atan2 of complex", "atan2(j, 1)", "1:1", "atan2: both arguments must be real"},
		{"polar with a unit angle", "polar(1, 1 V)", "1:10", "the second argument of polar must be an angle (e.g. 30° or 0.5 rad), not 1 V"},
		{"polar with complex magnitude", "polar(j, 1 rad)", "1:1", "polar: the magnitude must be real"},
		{"min of different units", "min(1 V, 1 A)", "1:1", "min: all arguments need the same unit"},
		{"max of complex", "max(1, j)", "1:1", "max: cannot order complex values"},
		{"matrix entries of different units", "[1 V, 2 A] + [1 V, 1 V]", "1:12", "cannot add entry (1, 2): 2 A is a current, the other a voltage"},
		{"product summing different units", "[1 V, 1 A] * [1; 1]", "1:12", "sums terms of different units"},
		{"inverse of inconsistent units", "inv([1 V, 1 A; 1 A, 1 V])", "1:1", "do not make an invertible set"},
		{"det of inconsistent units", "det([1 V, 2 A; 3 A, 4 V])", "1:1", "do not give the determinant a unit"},
		{"seq of different units", "seq(1 V, 1 A, 0)", "1:1", "seq: the three values need the same unit"},
		{"display unit of another dimension", "x[kA] = 3 V", "1:2", "x: the unit kA is a current, but the value is a voltage"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			err := firstError(tc.src)
			if err == nil {
				t.Fatalf("%q: no error", tc.src)
			}
			if got := errPos(err).String(); got != tc.pos {
				t.Errorf("%q: error at %s, want %s (%v)", tc.src, got, tc.pos, err)
			}
			if !strings.Contains(errMsg(err), tc.msg) {
				t.Errorf("%q: message %q, want it to contain %q", tc.src, errMsg(err), tc.msg)
			}
		})
	}
}

func TestPlainZeroMatchesAnyUnit(t *testing.T) {
	// LANGUAGE §4 / funcs.go isPlainZero: "check I > 0" needs no unit on 0.
	tests := []struct{ name, src string }{
		{"check against zero", "I = 2 A\ncheck I > 0"},
		{"check zero first", "check 0 < 1 V"},
		{"equal to zero", "check 0 V == 0"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			b := runBlock(tc.src)
			if errs := b.allErrors(); len(errs) > 0 {
				t.Fatal(errs)
			}
			if c := b.results[len(b.results)-1].Check; c == nil || !c.Pass {
				t.Errorf("%q does not hold", tc.src)
			}
		})
	}
}

func TestChecks(t *testing.T) {
	// LANGUAGE §2: comparisons and chains; == within 1e-9 relative.
	tests := []struct {
		name  string
		src   string
		pass  bool
		holds []bool
	}{
		{"chain holds", "pf = 0.97\ncheck 0.95 <= pf <= 1", true, []bool{true, true}},
		{"chain fails on the right", "check 1 < 2 < 0", false, []bool{true, false}},
		{"less", "check 1 V < 2 V", true, []bool{true}},
		{"less equal at equality", "check 2 V <= 2 V", true, []bool{true}},
		{"greater", "check 1 A > 2 A", false, []bool{false}},
		{"greater equal", "check 3 ≥ 2", true, []bool{true}},
		{"equal within 1e-9", "check 1 V == 1.0000000005 V", true, []bool{true}},
		{"not equal beyond 1e-9", "check 1 V == 1.000000002 V", false, []bool{false}},
		{"complex values may be equal", "check 3 + j4 == 5∠atan2(4, 3)", true, []bool{true}},
		{"not equal", "check 1 != 2", true, []bool{true}},
		{"not equal ≠", "check 1 ≠ 1", false, []bool{false}},
		{"abs of a phasor", "I = 1.5 kA∠-30°\ncheck |I| <= 6 kA", true, []bool{true}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			b := runBlock(tc.src)
			if errs := b.allErrors(); len(errs) > 0 {
				t.Fatal(errs)
			}
			c := b.results[len(b.results)-1].Check
			if c == nil {
				t.Fatal("not a check")
			}
			if c.Pass != tc.pass || len(c.Holds) != len(tc.holds) {
				t.Fatalf("pass %v holds %v, want %v %v", c.Pass, c.Holds, tc.pass, tc.holds)
			}
			for i := range c.Holds {
				if c.Holds[i] != tc.holds[i] {
					t.Errorf("holds %v, want %v", c.Holds, tc.holds)
				}
			}
		})
	}
}

func TestCheckUtilisation(t *testing.T) {
	// exec.go: utilisation a/b for a <= b and b/a for a >= b.
	tests := []struct {
		name string
		src  string
		util float64
		has  bool
	}{
		{"upper limit", "check 1.5 kA <= 6 kA", 0.25, true},
		{"lower limit", "check 400 V >= 360 V", 0.9, true},
		{"chain has none", "check 0 < 1 < 2", 0, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			b := runBlock(tc.src)
			c := b.results[0].Check
			if c == nil || c.HasUtil != tc.has || math.Abs(c.Utilisation-tc.util) > 1e-15 {
				t.Errorf("%q: %+v, want utilisation %v (%v)", tc.src, c, tc.util, tc.has)
			}
		})
	}
}

func TestUnavailableName(t *testing.T) {
	// env.go: a name whose definition failed is reported once, at its use,
	// pointing at the failed definition.
	b := runBlock("a = zz\nb = a + 1")
	if b.results[0].Err == nil {
		t.Fatal("a = zz: no error")
	}
	u, ok := b.results[1].Err.(*UnavailableError)
	if !ok {
		t.Fatalf("second error %T %v, want *UnavailableError", b.results[1].Err, b.results[1].Err)
	}
	if u.Pos.Position().InFile() != (Position{Line: 2, Col: 5}) || u.Def.Position().InFile() != (Position{Line: 1, Col: 1}) || u.Name != "a" {
		t.Errorf("got %+v", u)
	}
}
