package render_test

// The golden sheets in testdata/golden guard the layout, but a golden file
// alone only proves that the code agrees with itself. This test reads the
// numbers each golden sheet SHOWS and compares them with values computed here,
// by hand derivation from the example's inputs, with the handbook or standard
// relation named beside each one. It depends on nothing inside package render:
// it reads the golden HTML as bytes.
//
// A shown number passes when it lies within half a unit of its last shown
// digit from the reference (it is the reference rounded to the digits shown), and
// when it is shown to at least the sheet's significant figures (`digits:` in
// the example's front matter, 4 when absent). Check rows are compared side by
// side, and their verdicts against the comparison of the reference values.

import (
	"fmt"
	"html"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// gvRef is one shown value and its reference.
type gvRef struct {
	name string // the data-value attribute of the row
	cell int    // row-major index of a matrix cell; -1 for the whole value
	form string // how the sheet writes it: "real", "polar" or "rect"
	unit string // unit the sheet must show, without its SI prefix ("" for a plain number)
	ref  complex128
	// roundoff, when not zero, replaces the digit rule: the reference is an
	// exact zero by the algebra and the sheet shows floating-point roundoff,
	// which must stay below this bound (in the unit without prefix).
	roundoff float64
	source   string // where the reference comes from
}

// gvCheck is one check row: its shown sides and its verdict.
type gvCheck struct {
	desc  string
	sides []gvRef // name, cell unused; form is "real"
	rels  []string
}

type gvSheet struct {
	name   string   // example and golden file name
	inputs []string // lines of the example the references below are computed from
	values []gvRef
	checks []gvCheck
}

// Degrees of an angle, the way the sheet shows angles.
func gvDeg(rad float64) float64 { return rad * 180 / math.Pi }

func gvPolar(mag, deg float64) complex128 { return cmplx.Rect(mag, deg*math.Pi/180) }

func gvReal(x float64) complex128 { return complex(x, 0) }

// --- motor-pfc ----------------------------------------------------------

func gvMotorPFC(t *testing.T) gvSheet {
	const (
		vLL  = 400.0 // V
		f    = 50.0  // Hz
		pOut = 75e3  // W
		eta  = 0.945 // efficiency
		pfM  = 0.86  // motor power factor, lagging
		pfT  = 0.96  // target power factor, lagging
		iZ   = 150.0 // A, cable rating
		low  = 0.95  // lower limit of the pf check
		high = 1.0   // upper limit of the pf check
		src  = "IEEE 1459"
	)
	w := 2 * math.Pi * f
	// Star equivalent of a balanced supply: V_ph = V_LL/√3 (common practice).
	vPh := vLL / math.Sqrt(3)
	// Efficiency: P_in = P_out/η.
	pIn := pOut / eta
	// Displacement power factor of a sinusoidal load: pf = cos φ (IEEE 1459).
	phiM := math.Acos(pfM)
	// Power triangle (IEEE 1459): Q = P·tan φ, S = P + jQ, |S| = P/pf.
	qM := pIn * math.Tan(phiM)
	sM := complex(pIn, qM)
	// Balanced three-phase complex power S = 3·V_ph·conj(I) (IEEE 1459) with
	// V_ph real (phase a reference) gives I = conj(S)/(3·V_ph):
	// |I| = |S|/(3·V_ph), arg I = −φ.
	iM := cmplx.Conj(sM) / complex(3*vPh, 0)
	// Reactive power left at the target: Q_t = P·tan(acos pf_t); the bank
	// supplies the rest, Q_c = Q_m − Q_t (reactive power balance, common practice).
	qT := pIn * math.Tan(math.Acos(pfT))
	qC := qM - qT
	// A capacitor C on V_ph draws I = jωC·V_ph, so S = V_ph·conj(I) = −jωC·V_ph²:
	// it supplies ωC·V_ph² per phase. Three phases: C = Q_c/(3ω·V_ph²).
	c := qC / (3 * w * vPh * vPh)
	// Z = 1/(jωC) = −j/(ωC).
	zC := complex(0, -1/(w*c))
	// I_c = V_ph/Z_c = jωC·V_ph, leading V_ph by 90°.
	iC := complex(0, w*c*vPh)
	// Branch current, hand derivation:
	//   I_b = I_m + I_c = (P − jQ_m)/(3V) + j·3ωCV²/(3V) = (P − j(Q_m − Q_c))/(3V)
	//       = (P − jQ_t)/(3V),   so |I_b| = P/(3V·pf_t), arg I_b = −acos(pf_t).
	iB := complex(pIn, -qT) / complex(3*vPh, 0)
	// S_b = 3·V_ph·conj(I_b) = P + jQ_t (IEEE 1459).
	sB := complex(pIn, qT)
	// pf = P/|S| (IEEE 1459) = P/(P·√(1 + tan²φ_t)) = cos φ_t = pf_t.
	pfB := pfT
	// The two routes must agree before either is used as a reference.
	if d := cmplx.Abs(iB - (iM + iC)); d > 1e-9 {
		t.Fatalf("motor-pfc: closed form of I_b differs from I_m + I_c by %g A", d)
	}
	return gvSheet{
		name: "motor-pfc",
		inputs: []string{"digits: 4", "V_LL = 400 V", "f = 50 Hz", "P_out = 75 kW", "eta = 0.945",
			"pf_m = 0.86", "pf_t = 0.96", "I_z = 150 A", "check 0.95 <= pf_b <= 1",
			"check |I_b| <= I_z", "check |I_m| <= I_z"},
		values: []gvRef{
			{"V_ph", -1, "real", "V", gvReal(vPh), 0, "V_LL/√3, common practice"},
			{"P_in", -1, "real", "W", gvReal(pIn), 0, "P_out/η"},
			{"phi_m", -1, "real", "°", gvReal(gvDeg(phiM)), 0, "pf = cos φ, " + src},
			{"S_m", -1, "rect", "VA", sM, 0, "S = P + jP·tan φ, " + src},
			{"I_m", -1, "polar", "A", iM, 0, "S = 3·V_ph·conj(I), " + src},
			{"Q_m", -1, "real", "var", gvReal(qM), 0, "Q = P·tan φ, " + src},
			{"Q_t", -1, "real", "var", gvReal(qT), 0, "Q = P·tan(acos pf_t), " + src},
			{"Q_c", -1, "real", "var", gvReal(qC), 0, "Q_m − Q_t, common practice"},
			{"C_ph", -1, "real", "F", gvReal(c), 0, "Q_c = 3ωC·V_ph², hand derivation"},
			{"Z_c", -1, "rect", "Ω", zC, 0, "1/(jωC)"},
			{"I_c", -1, "polar", "A", iC, 0, "jωC·V_ph"},
			{"I_b", -1, "polar", "A", iB, 0, "(P − jQ_t)/(3·V_ph), hand derivation"},
			{"S_b", -1, "rect", "VA", sB, 0, "3·V_ph·conj(I_b) = P + jQ_t, " + src},
			{"pf_b", -1, "real", "", gvReal(pfB), 0, "P/|S| = cos φ_t, " + src},
		},
		checks: []gvCheck{
			{"0.95 <= pf_b <= 1", []gvRef{
				{form: "real", ref: gvReal(low)},
				{form: "real", ref: gvReal(pfB), source: "cos φ_t"},
				{form: "real", ref: gvReal(high)}}, []string{"≤", "≤"}},
			{"|I_b| <= I_z", []gvRef{
				{form: "real", unit: "A", ref: gvReal(cmplx.Abs(iB))},
				{form: "real", unit: "A", ref: gvReal(iZ)}}, []string{"≤"}},
			{"|I_m| <= I_z", []gvRef{
				{form: "real", unit: "A", ref: gvReal(cmplx.Abs(iM))},
				{form: "real", unit: "A", ref: gvReal(iZ)}}, []string{"≤"}},
		},
	}
}

// --- cable-voltage-drop -------------------------------------------------

func gvCableDrop(t *testing.T) gvSheet {
	const (
		r20   = 1.15e-3 // Ω/m (1.15 Ω/km)
		alpha = 0.00393 // 1/K at 20 °C
		tOp   = 70.0    // °C
		x     = 0.08e-3 // Ω/m
		l     = 62.0    // m
		vLL   = 400.0   // V
		s     = 38e3    // VA
		pf    = 0.9     // lagging
		limit = 0.03    // 3 %
	)
	// Resistance at the operating temperature: R = R_20·(1 + α_20·(θ − 20))
	// (IEC 60287-1-1, the relation the example cites; quoted from memory).
	rOp := r20 * (1 + alpha*(tOp-20))
	r, xl := rOp*l, x*l
	// Balanced three-phase load: S = √3·U·I (IEEE 1459), lagging by acos(pf).
	iMag := s / (math.Sqrt(3) * vLL)
	phi := math.Acos(pf)
	vPh := vLL / math.Sqrt(3)
	// Receiving-end voltage, hand derivation of the phasor diagram with V_ph
	// real and I = |I|·(cos φ − j sin φ):
	//   I·Z = |I|·(R cos φ + X sin φ) + j|I|·(X cos φ − R sin φ) = a + jb
	//   V_r = V_ph − I·Z = (V_ph − a) − jb,  |V_r| = √((V_ph − a)² + b²).
	// The first-order term a is the common-practice drop per phase
	// (ΔU = √3·I·(R cos φ + X sin φ) line to line); the b² term is kept here
	// because at four figures it matters (1.875 % against 1.872 %).
	a := iMag * (r*math.Cos(phi) + xl*math.Sin(phi))
	b := iMag * (xl*math.Cos(phi) - r*math.Sin(phi))
	vR := complex(vPh-a, -b)
	dV := (vPh - cmplx.Abs(vR)) / vPh
	// The same with math/cmplx straight from the phasors.
	iL := cmplx.Rect(iMag, -phi)
	if d := cmplx.Abs(vR - (complex(vPh, 0) - iL*complex(r, xl))); d > 1e-9 {
		t.Fatalf("cable-voltage-drop: phasor-diagram V_r differs from cmplx by %g V", d)
	}
	// The common-practice first-order drop must be close (within 0.01 point).
	if d := math.Abs(a/vPh - dV); d > 1e-4 {
		t.Fatalf("cable-voltage-drop: first-order drop differs by %g", d)
	}
	return gvSheet{
		name: "cable-voltage-drop",
		inputs: []string{"r_20 = 1.15 Ω/km", "alpha_20 = 0.00393", "T_op = 70", "x = 0.08 Ω/km",
			"L = 62 m", "V_LL = 400 V", "S_load = 38 kVA", "pf = 0.9", "check dV <= 3 %"},
		values: []gvRef{
			{"r_op", -1, "real", "Ω/m", gvReal(rOp), 0, "R_20·(1 + α(θ − 20)), IEC 60287-1-1"},
			{"Z_c", -1, "rect", "Ω", complex(r, xl), 0, "(r + jx)·L"},
			{"V_ph", -1, "real", "V", gvReal(vPh), 0, "V_LL/√3, common practice"},
			{"I_L", -1, "polar", "A", iL, 0, "S = √3·U·I, IEEE 1459"},
			{"V_r", -1, "polar", "V", vR, 0, "phasor diagram, hand derivation"},
			{"dV", -1, "real", "", gvReal(dV), 0, "(|V_ph| − |V_r|)/|V_ph|, hand derivation"},
		},
		checks: []gvCheck{
			{"dV <= 3 %", []gvRef{
				{form: "real", ref: gvReal(dV)},
				{form: "real", ref: gvReal(limit)}}, []string{"≤"}},
		},
	}
}

// --- earth-fault-loop ---------------------------------------------------

func gvEarthFault(t *testing.T) gvSheet {
	const (
		u0   = 230.0   // V
		cMin = 0.95    // minimum voltage factor
		iN   = 20.0    // A
		l    = 31.0    // m
		r1   = 7.41e-3 // Ω/m
		r2   = 12.1e-3 // Ω/m
		kT   = 1.20
	)
	zE := complex(0.21, 0.06) // Ω, measured
	// Type B circuit-breaker, IEC 60898-1: instantaneous tripping at no more
	// than 5·I_n (from memory of the standard, as the example states).
	iA := 5 * iN
	// Line and protective conductor in series, raised for temperature.
	r12 := (r1 + r2) * l * kT
	zS := zE + complex(r12, 0)
	// Ohm's law on the loop with the minimum source voltage c_min·U_0
	// (voltage factor as in IEC 60909-0, Table 1, low voltage; from memory).
	iEF := complex(cMin*u0, 0) / zS
	// Disconnection condition Z_s·I_a ≤ U_0 (IEC 60364-4-41, 411.4.4; from
	// memory), here with c_min·U_0: Z_max = c_min·U_0/I_a.
	zMax := cMin * u0 / iA
	return gvSheet{
		name: "earth-fault-loop",
		inputs: []string{"U_0 = 230 V", "c_min = 0.95", "I_n = 20 A", "I_a = 5 * I_n",
			"Z_e = (0.21 + j0.06) Ω", "L = 31 m", "r_1 = 7.41 Ω/km", "r_2 = 12.1 Ω/km", "k_T = 1.20",
			"check |Z_s| <= Z_max", "check |I_ef| >= I_a"},
		values: []gvRef{
			{"I_a", -1, "real", "A", gvReal(iA), 0, "5·I_n, IEC 60898-1 type B"},
			{"R_12", -1, "real", "Ω", gvReal(r12), 0, "(r_1 + r_2)·L·k_T"},
			{"Z_s", -1, "rect", "Ω", zS, 0, "Z_e + R_12"},
			{"I_ef", -1, "polar", "A", iEF, 0, "c_min·U_0/Z_s, Ohm's law with IEC 60909-0 c"},
			{"Z_max", -1, "real", "Ω", gvReal(zMax), 0, "Z_s·I_a ≤ c_min·U_0, IEC 60364-4-41"},
		},
		checks: []gvCheck{
			{"|Z_s| <= Z_max", []gvRef{
				{form: "real", unit: "Ω", ref: gvReal(cmplx.Abs(zS))},
				{form: "real", unit: "Ω", ref: gvReal(zMax)}}, []string{"≤"}},
			{"|I_ef| >= I_a", []gvRef{
				{form: "real", unit: "A", ref: gvReal(cmplx.Abs(iEF))},
				{form: "real", unit: "A", ref: gvReal(iA)}}, []string{"≥"}},
		},
	}
}

// --- supply-unbalance ---------------------------------------------------

func gvUnbalance(t *testing.T) gvSheet {
	va := gvPolar(236.1, 0)
	vb := gvPolar(229.4, -121.2)
	vc := gvPolar(231.8, 118.9)
	// Fortescue's transformation (C. L. Fortescue 1918), a = 1∠120°:
	//   V_0 = (V_a + V_b + V_c)/3
	//   V_1 = (V_a + a·V_b + a²·V_c)/3
	//   V_2 = (V_a + a²·V_b + a·V_c)/3
	a := gvPolar(1, 120)
	v0 := (va + vb + vc) / 3
	v1 := (va + a*vb + a*a*vc) / 3
	v2 := (va + a*a*vb + a*vc) / 3
	u2 := cmplx.Abs(v2) / cmplx.Abs(v1)
	u0 := cmplx.Abs(v0) / cmplx.Abs(v1)
	// Cross-check of u_2 from magnitudes only, by the unbalance formula of
	// IEC 61000-4-30 (from memory): with the line-to-line magnitudes U,
	//   β = ΣU⁴/(ΣU²)²,  u_2 = √((1 − √(3 − 6β))/(1 + √(3 − 6β))).
	// Line-to-line voltages hold no zero sequence and their sequence parts are
	// (1 − a²)·V_1 and (1 − a)·V_2, both of magnitude √3, so the ratio is the same.
	uab, ubc, uca := cmplx.Abs(va-vb), cmplx.Abs(vb-vc), cmplx.Abs(vc-va)
	s2 := uab*uab + ubc*ubc + uca*uca
	beta := (math.Pow(uab, 4) + math.Pow(ubc, 4) + math.Pow(uca, 4)) / (s2 * s2)
	k := math.Sqrt(3 - 6*beta)
	if d := math.Abs(math.Sqrt((1-k)/(1+k)) - u2); d > 1e-9 {
		t.Fatalf("supply-unbalance: IEC 61000-4-30 u_2 differs from Fortescue by %g", d)
	}
	const limit = 0.02
	const limitV = 1e-3 // 1 mV
	// A·A⁻¹ = 1, so abc(seq(V)) = V exactly; the sheet shows roundoff only.
	const roundoff = 1e-9 // V
	return gvSheet{
		name: "supply-unbalance",
		inputs: []string{"V_a = 236.1 V∠0°", "V_b = 229.4 V∠-121.2°", "V_c = 231.8 V∠118.9°",
			"check u_2 <= 2 %", "check dV_max <= 1 mV"},
		values: []gvRef{
			{"V_0", -1, "polar", "V", v0, 0, "Fortescue 1918"},
			{"V_1", -1, "polar", "V", v1, 0, "Fortescue 1918"},
			{"V_2", -1, "polar", "V", v2, 0, "Fortescue 1918"},
			{"V_0,V_1,V_2", 0, "polar", "V", v0, 0, "Fortescue 1918"},
			{"V_0,V_1,V_2", 1, "polar", "V", v1, 0, "Fortescue 1918"},
			{"V_0,V_1,V_2", 2, "polar", "V", v2, 0, "Fortescue 1918"},
			{"u_2", -1, "real", "", gvReal(u2), 0, "|V_2|/|V_1|, Fortescue; IEC 61000-4-30 cross-check"},
			{"u_0", -1, "real", "", gvReal(u0), 0, "|V_0|/|V_1|, Fortescue 1918"},
			{"V_back", 0, "real", "V", va, 0, "inverse transformation returns the measurement"},
			{"V_back", 1, "polar", "V", vb, 0, "inverse transformation returns the measurement"},
			{"V_back", 2, "polar", "V", vc, 0, "inverse transformation returns the measurement"},
			{"dV_max", -1, "real", "V", 0, roundoff, "zero by A·A⁻¹ = 1, hand derivation"},
		},
		checks: []gvCheck{
			{"u_2 <= 2 %", []gvRef{
				{form: "real", ref: gvReal(u2)},
				{form: "real", ref: gvReal(limit)}}, []string{"≤"}},
			{"dV_max <= 1 mV", []gvRef{
				{form: "real", unit: "V", ref: 0, roundoff: roundoff},
				{form: "real", unit: "V", ref: gvReal(limitV)}}, []string{"≤"}},
		},
	}
}

// --- line-sequence-impedance --------------------------------------------

func gvLineSequence(t *testing.T) gvSheet {
	const (
		length = 4.2 // km
		uN     = 11e3
		c      = 1.1 // IEC 60909-0:2016, Table 1, maximum, above 1 kV
		zF     = 2.5 // Ω
		iSet   = 80.0
	)
	zs := complex(0.368, 0.712) * length // Ω, self impedance of the spur
	zm := complex(0.172, 0.331) * length // Ω, mutual impedance
	// A symmetric phase matrix [Zs Zm Zm; Zm Zs Zm; Zm Zm Zs] is diagonalised
	// by Fortescue's transformation (C. L. Fortescue 1918):
	//   Z_0 = Zs + 2·Zm,  Z_1 = Z_2 = Zs − Zm,  off-diagonal terms 0
	// (hand derivation: A's columns are eigenvectors; 1 + a + a² = 0).
	z0 := zs + 2*zm
	z1 := zs - zm
	z2 := z1
	a := gvPolar(1, 120)
	// The same by the matrix product A⁻¹·Z·A, A⁻¹ = (1/3)[1 1 1; 1 a a²; 1 a² a].
	A := [3][3]complex128{{1, 1, 1}, {1, a * a, a}, {1, a, a * a}}
	Ai := [3][3]complex128{{1, 1, 1}, {1, a, a * a}, {1, a * a, a}}
	Z := [3][3]complex128{{zs, zm, zm}, {zm, zs, zm}, {zm, zm, zs}}
	var z012 [3][3]complex128
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			for k := 0; k < 3; k++ {
				for m := 0; m < 3; m++ {
					z012[i][j] += Ai[i][k] * Z[k][m] * A[m][j] / 3
				}
			}
		}
	}
	want := [3][3]complex128{{z0, 0, 0}, {0, z1, 0}, {0, 0, z2}}
	for i := range want {
		for j := range want[i] {
			if d := cmplx.Abs(z012[i][j] - want[i][j]); d > 1e-12 {
				t.Fatalf("line-sequence-impedance: A⁻¹ZA[%d][%d] differs from the closed form by %g", i, j, d)
			}
		}
	}
	vPh := uN / math.Sqrt(3)
	zSrc1 := complex(0.24, 1.62)
	zSrc0 := complex(0.31, 2.05)
	z0t, z1t, z2t := zSrc0+z0, zSrc1+z1, zSrc1+z2
	// Single-line-to-earth fault: the three sequence networks in series through
	// 3·Z_f, I_f = 3·I_0 = 3·c·V_ph/(Z_0 + Z_1 + Z_2 + 3·Z_f) (symmetrical
	// components; with Z_f = 0 this is IEC 60909-0's I"k1 = √3·c·U_n/|Z_1 + Z_2 + Z_0|).
	iF := complex(3*c*vPh, 0) / (z0t + z1t + z2t + complex(3*zF, 0))
	const roundoff = 1e-12 // Ω; A⁻¹ZA's off-diagonal terms are 0 by the algebra
	return gvSheet{
		name: "line-sequence-impedance",
		inputs: []string{"Z_s = (0.368 + j0.712) Ω/km", "Z_m = (0.172 + j0.331) Ω/km", "len = 4.2 km",
			"U_n = 11 kV", "c = 1.1", "Z_src1 = (0.24 + j1.62) Ω", "Z_src0 = (0.31 + j2.05) Ω",
			"Z_f = 2.5 Ω", "I_setting = 80 A", "check abs(Z_012(1, 2)) <= 1 mΩ",
			"check |I_f| >= 1.5 * I_setting"},
		values: []gvRef{
			{"Z_abc", 0, "rect", "Ω", zs, 0, "len·Z_s"},
			{"Z_abc", 1, "rect", "Ω", zm, 0, "len·Z_m"},
			{"a", -1, "rect", "", a, 0, "Fortescue operator 1∠120° = −1/2 + j√3/2"},
			{"Z_012", 0, "rect", "Ω", z0, 0, "Z_s + 2Z_m, Fortescue 1918"},
			{"Z_012", 1, "real", "Ω", 0, 0, "0 for a transposed line, Fortescue 1918"},
			{"Z_012", 4, "rect", "Ω", z1, 0, "Z_s − Z_m, Fortescue 1918"},
			{"Z_012", 8, "rect", "Ω", z2, 0, "Z_s − Z_m, Fortescue 1918"},
			{"Z_0", -1, "rect", "Ω", z0, 0, "Z_s + 2Z_m, Fortescue 1918"},
			{"Z_1", -1, "rect", "Ω", z1, 0, "Z_s − Z_m, Fortescue 1918"},
			{"Z_2", -1, "rect", "Ω", z2, 0, "Z_s − Z_m, Fortescue 1918"},
			{"V_ph", -1, "real", "V", gvReal(vPh), 0, "U_n/√3, common practice"},
			{"Z_0t", -1, "rect", "Ω", z0t, 0, "Z_src0 + Z_0"},
			{"Z_1t", -1, "rect", "Ω", z1t, 0, "Z_src1 + Z_1"},
			{"Z_2t", -1, "rect", "Ω", z2t, 0, "Z_src1 + Z_2"},
			{"I_f", -1, "polar", "A", iF, 0, "3cV/(Z_0 + Z_1 + Z_2 + 3Z_f), IEC 60909-0 c"},
		},
		checks: []gvCheck{
			{"abs(Z_012(1, 2)) <= 1 mΩ", []gvRef{
				{form: "real", unit: "Ω", ref: 0, roundoff: roundoff},
				{form: "real", unit: "Ω", ref: gvReal(1e-3)}}, []string{"≤"}},
			{"|I_f| >= 1.5 * I_setting", []gvRef{
				{form: "real", unit: "A", ref: gvReal(cmplx.Abs(iF))},
				{form: "real", unit: "A", ref: gvReal(1.5 * iSet)}}, []string{"≥"}},
		},
	}
}

// TestGoldenValues compares the key numbers and check verdicts shown on each
// golden sheet with the references above.
func TestGoldenValues(t *testing.T) {
	sheets := []func(*testing.T) gvSheet{gvMotorPFC, gvCableDrop, gvEarthFault, gvUnbalance, gvLineSequence}
	for _, mk := range sheets {
		sh := mk(t)
		t.Run(sh.name, func(t *testing.T) {
			src, err := os.ReadFile(filepath.Join("..", "examples", sh.name+".md"))
			if err != nil {
				t.Fatal(err)
			}
			// The references are computed from these inputs; if the example
			// changes them, the hand computation here must be redone.
			for _, in := range sh.inputs {
				if !strings.Contains(string(src), in) {
					t.Errorf("examples/%s.md no longer contains %q: redo the hand computation in this test", sh.name, in)
				}
			}
			digits := gvDigits(string(src))
			raw, err := os.ReadFile(filepath.Join("..", "testdata", "golden", sh.name+".html"))
			if err != nil {
				t.Fatal(err)
			}
			page := string(raw)
			for _, v := range sh.values {
				label := v.name
				if v.cell >= 0 {
					label = fmt.Sprintf("%s cell %d", v.name, v.cell)
				}
				t.Run(label, func(t *testing.T) {
					text, err := gvValueText(page, v.name, v.cell)
					if err != nil {
						t.Fatal(err)
					}
					if err := gvCompare(text, v, digits); err != nil {
						t.Errorf("%s shows %q: %v (reference: %s)", label, text, err, v.source)
					}
				})
			}
			rows := gvCheckRows(page)
			if len(rows) != len(sh.checks) {
				t.Fatalf("sheet has %d check rows, the example has %d checks", len(rows), len(sh.checks))
			}
			held := 0
			for i, c := range sh.checks {
				row := rows[i]
				holds := gvHolds(c)
				if holds {
					held++
				}
				t.Run("check "+c.desc, func(t *testing.T) {
					want := "satisfied"
					if !holds {
						want = "not satisfied"
					}
					if row.verdict != want {
						t.Errorf("check row (line %s) says %q; the reference values give %q", row.line, row.verdict, want)
					}
					if len(row.sides) != len(c.sides) || strings.Join(row.rels, " ") != strings.Join(c.rels, " ") {
						t.Fatalf("check row (line %s) reads %q, want %d sides joined by %v", row.line, row.text, len(c.sides), c.rels)
					}
					for j, s := range c.sides {
						if err := gvCompare(row.sides[j], s, digits); err != nil {
							t.Errorf("check row (line %s) side %d shows %q: %v", row.line, j+1, row.sides[j], err)
						}
					}
				})
			}
			summary := fmt.Sprintf("Checks: %d satisfied, %d not satisfied.", held, len(sh.checks)-held)
			if !strings.Contains(page, summary) {
				t.Errorf("summary does not read %q", summary)
			}
		})
	}
}

// gvHolds compares the reference sides of a check by its relations.
func gvHolds(c gvCheck) bool {
	for i, rel := range c.rels {
		l, r := real(c.sides[i].ref), real(c.sides[i+1].ref)
		var ok bool
		switch rel {
		case "≤":
			ok = l <= r
		case "≥":
			ok = l >= r
		case "<":
			ok = l < r
		case ">":
			ok = l > r
		default:
			panic("relation " + rel)
		}
		if !ok {
			return false
		}
	}
	return true
}

var gvDigitsRE = regexp.MustCompile(`(?m)^digits:\s*(\d+)\s*$`)

// gvDigits reads `digits:` from the front matter; 4 when absent (LANGUAGE.md §1).
func gvDigits(src string) int {
	if m := gvDigitsRE.FindStringSubmatch(src); m != nil {
		n, _ := strconv.Atoi(m[1])
		return n
	}
	return 4
}

// --- reading the sheet ----------------------------------------------------

// gvElement returns the inner HTML of the element whose opening tag carries
// attr="val"; the attribute must occur exactly once.
func gvElement(page, attr, val string) (string, error) {
	key := attr + `="` + val + `"`
	if n := strings.Count(page, key); n != 1 {
		return "", fmt.Errorf("%s occurs %d times on the sheet, want 1", key, n)
	}
	at := strings.Index(page, key)
	open := strings.LastIndex(page[:at], "<")
	end := strings.Index(page[at:], ">")
	if open < 0 || end < 0 {
		return "", fmt.Errorf("%s: no enclosing tag", key)
	}
	tag := page[open+1:]
	tag = tag[:strings.IndexAny(tag, " \t\n>")]
	body := at + end + 1
	depth := 1
	for i := body; i < len(page); {
		next := strings.Index(page[i:], "<")
		if next < 0 {
			break
		}
		i += next
		switch {
		case strings.HasPrefix(page[i:], "</"+tag+">"):
			depth--
			if depth == 0 {
				return page[body:i], nil
			}
		case strings.HasPrefix(page[i:], "<"+tag+">"), strings.HasPrefix(page[i:], "<"+tag+" "):
			depth++
		}
		i++
	}
	return "", fmt.Errorf("%s: element not closed", key)
}

var (
	gvMspaceRE = regexp.MustCompile(`<mi class="u">|<mtext class="pfsense">`)
	gvPow10RE  = regexp.MustCompile(`<msup>\s*<mn>10</mn>\s*<mn>([^<]*)</mn>\s*</msup>`)
	gvTagRE    = regexp.MustCompile(`<[^>]*>`)
	gvCellRE   = regexp.MustCompile(`(?s)<mtd>(.*?)</mtd>`)
	gvMathRE   = regexp.MustCompile(`(?s)<math[^>]*>(.*?)</math>`)
	gvSpacesRE = regexp.MustCompile(`\s+`)
)

// gvText is the plain text of a piece of MathML: a space before a unit or a
// power factor's sense (the style's, classes "u" and "pfsense"), 10^n for
// a power of ten, tags dropped, entities decoded, U+2212 read as '-'.
func gvText(frag string) string {
	s := gvMspaceRE.ReplaceAllStringFunc(frag, func(tag string) string { return " " + tag })
	s = gvPow10RE.ReplaceAllString(s, "10^$1")
	s = gvTagRE.ReplaceAllString(s, "")
	s = html.UnescapeString(s)
	s = strings.ReplaceAll(s, "\u2212", "-")
	return strings.TrimSpace(gvSpacesRE.ReplaceAllString(s, " "))
}

// gvValueText is the shown value of a row: the text after "=" (the row may
// lead with the name), or the text of one matrix cell.
func gvValueText(page, name string, cell int) (string, error) {
	inner, err := gvElement(page, "data-value", name)
	if err != nil {
		return "", err
	}
	if cell >= 0 {
		cells := gvCellRE.FindAllStringSubmatch(inner, -1)
		if cell >= len(cells) {
			return "", fmt.Errorf("%s has %d cells, want cell %d", name, len(cells), cell)
		}
		return gvText(cells[cell][1]), nil
	}
	text := gvText(inner)
	eq := strings.Index(text, "=")
	if eq < 0 {
		return "", fmt.Errorf("%s: no '=' in %q", name, text)
	}
	return strings.TrimSpace(text[eq+1:]), nil
}

type gvCheckRow struct {
	line, text, verdict string
	sides, rels         []string
}

var (
	gvCheckRE   = regexp.MustCompile(`data-check="([^"]*)"`)
	gvVerdictRE = regexp.MustCompile(`<span class="verdict (pass|fail)">([^<]*)</span>`)
	gvRelRE     = regexp.MustCompile(`[≤≥<>]`)
)

// gvCheckRows reads the check rows in sheet order: the shown sides, the
// relations between them and the verdict ("satisfied" or "not satisfied";
// "?" when the words and the class disagree).
func gvCheckRows(page string) []gvCheckRow {
	var rows []gvCheckRow
	for _, m := range gvCheckRE.FindAllStringSubmatch(page, -1) {
		row := gvCheckRow{line: m[1]}
		inner, err := gvElement(page, "data-check", m[1])
		if err != nil {
			row.text = err.Error()
			rows = append(rows, row)
			continue
		}
		if mm := gvMathRE.FindStringSubmatch(inner); mm != nil {
			row.text = gvText(mm[1])
			row.rels = gvRelRE.FindAllString(row.text, -1)
			for _, s := range gvRelRE.Split(row.text, -1) {
				row.sides = append(row.sides, strings.TrimSpace(s))
			}
		}
		if v := gvVerdictRE.FindStringSubmatch(inner); v != nil {
			words := strings.ToLower(strings.TrimSpace(v[2]))
			switch {
			case v[1] == "pass" && words == "satisfied":
				row.verdict = "satisfied"
			case v[1] == "fail" && words == "not satisfied":
				row.verdict = "not satisfied"
			default:
				row.verdict = "?"
			}
		}
		rows = append(rows, row)
	}
	return rows
}

// --- reading a shown value ------------------------------------------------

// gvNum is a shown number and half a unit of its last shown digit.
type gvNum struct{ v, half float64 }

const gvNumPat = `[-+]?\d+(?:\.\d*)?(?:(?:×10\^|[eE])[-+]?\d+)?`

var (
	gvPolarRE = regexp.MustCompile(`^(` + gvNumPat + `)\s*∠\s*(` + gvNumPat + `)\s*°\s*(\S*)$`)
	gvRectRE  = regexp.MustCompile(`^\(?\s*(` + gvNumPat + `)?\s*([-+])?\s*j\s*(` + gvNumPat + `)\s*\)?\s*(\S*)$`)
	gvRealRE  = regexp.MustCompile(`^(` + gvNumPat + `)\s*(\S*)$`)
	gvMantRE  = regexp.MustCompile(`^([-+]?\d+(?:\.(\d*))?)(?:(?:×10\^|[eE])([-+]?\d+))?$`)
)

func gvParseNum(s string) (gvNum, error) {
	m := gvMantRE.FindStringSubmatch(s)
	if m == nil {
		return gvNum{}, fmt.Errorf("not a number: %q", s)
	}
	exp := 0
	if m[3] != "" {
		exp, _ = strconv.Atoi(m[3])
	}
	v, err := strconv.ParseFloat(m[1]+"e"+strconv.Itoa(exp), 64)
	if err != nil {
		return gvNum{}, err
	}
	return gvNum{v: v, half: 0.5 * math.Pow(10, float64(exp-len(m[2])))}, nil
}

// gvShown is a parsed value: its form, its numbers (real; magnitude and
// angle; real and imaginary part) and its unit as written.
type gvShown struct {
	form string
	nums []gvNum
	unit string
}

func gvParse(text string) (gvShown, error) {
	var parts []string
	var sh gvShown
	if m := gvPolarRE.FindStringSubmatch(text); m != nil {
		sh.form, parts, sh.unit = "polar", []string{m[1], m[2]}, m[3]
	} else if m := gvRectRE.FindStringSubmatch(text); m != nil {
		re := m[1]
		if re == "" {
			re = "0"
		}
		im := m[3]
		if strings.HasPrefix(im, "-") || strings.HasPrefix(im, "+") {
			return sh, fmt.Errorf("signed imaginary part in %q", text)
		}
		if m[2] == "-" {
			im = "-" + im
		}
		sh.form, parts, sh.unit = "rect", []string{re, im}, m[4]
	} else if m := gvRealRE.FindStringSubmatch(text); m != nil {
		sh.form, parts, sh.unit = "real", []string{m[1]}, m[2]
	} else {
		return sh, fmt.Errorf("cannot read %q as a value", text)
	}
	for _, p := range parts {
		n, err := gvParseNum(p)
		if err != nil {
			return sh, err
		}
		sh.nums = append(sh.nums, n)
	}
	if sh.form == "rect" && parts[0] == "0" {
		// No real part written: it is shown as exactly zero to the imaginary
		// part's digits.
		sh.nums[0].half = sh.nums[1].half
	}
	return sh, nil
}

var gvPrefixes = map[string]float64{"p": 1e-12, "n": 1e-9, "µ": 1e-6, "u": 1e-6, "m": 1e-3, "k": 1e3, "M": 1e6, "G": 1e9}

var gvUnits = map[string]bool{"V": true, "A": true, "Ω": true, "W": true, "var": true, "VA": true,
	"F": true, "H": true, "S": true, "Hz": true, "m": true, "s": true}

// gvUnit splits a shown unit into its scale to the unprefixed unit and that
// unit: "kVA" → 1e3, "VA"; "mΩ/m" → 1e-3, "Ω/m"; "Ω/km" → 1e-3, "Ω/m";
// "%" → 0.01, "" (a plain number); "°" → 1, "°".
func gvUnit(u string) (float64, string, error) {
	switch u {
	case "":
		return 1, "", nil
	case "%":
		return 0.01, "", nil
	case "°":
		return 1, "°", nil
	}
	if num, den, ok := strings.Cut(u, "/"); ok {
		sn, bn, err := gvUnit(num)
		if err != nil {
			return 0, "", err
		}
		sd, bd, err := gvUnit(den)
		if err != nil || bd == "" || bd == "°" {
			return 0, "", fmt.Errorf("unknown unit %q", u)
		}
		return sn / sd, bn + "/" + bd, nil
	}
	if gvUnits[u] {
		return 1, u, nil
	}
	for p, s := range gvPrefixes {
		if rest, ok := strings.CutPrefix(u, p); ok && gvUnits[rest] {
			return s, rest, nil
		}
	}
	return 0, "", fmt.Errorf("unknown unit %q", u)
}

// gvWithin reports whether a shown number agrees with a reference in the
// shown unit: within half a unit of the last shown digit, plus a relative
// epsilon for the binary representation.
func gvWithin(n gvNum, ref float64) bool {
	return math.Abs(n.v-ref) <= n.half*(1+1e-9)+1e-12*math.Abs(ref)
}

// gvEnoughDigits reports whether a shown number carries at least `digits`
// significant figures (a zero carries none to count).
func gvEnoughDigits(n gvNum, digits int) bool {
	if n.v == 0 {
		return true
	}
	lead := math.Floor(math.Log10(math.Abs(n.v)))
	return 2*n.half <= math.Pow(10, lead-float64(digits)+1)*(1+1e-9)
}

// gvCompare checks a shown value against its reference.
func gvCompare(text string, r gvRef, digits int) error {
	sh, err := gvParse(text)
	if err != nil {
		return err
	}
	scale, unit, err := gvUnit(sh.unit)
	if err != nil {
		return err
	}
	if unit != r.unit {
		return fmt.Errorf("unit %q, want a multiple of %q", sh.unit, r.unit)
	}
	if sh.form != r.form {
		return fmt.Errorf("%s form, want %s", sh.form, r.form)
	}
	ref := r.ref / complex(scale, 0)
	if r.roundoff > 0 {
		if got := math.Abs(sh.nums[0].v * scale); sh.form != "real" || got > r.roundoff {
			return fmt.Errorf("reference is exactly 0; shown roundoff %g exceeds %g", got, r.roundoff)
		}
		return nil
	}
	var main gvNum
	switch sh.form {
	case "real":
		if math.Abs(imag(ref)) > 1e-9*cmplx.Abs(ref) {
			return fmt.Errorf("shown as real, reference %v is not", r.ref)
		}
		if !gvWithin(sh.nums[0], real(ref)) {
			return fmt.Errorf("reference %.7g %s", real(ref), sh.unit)
		}
		main = sh.nums[0]
	case "polar":
		mag, ang := cmplx.Abs(ref), gvDeg(cmplx.Phase(ref))
		d := math.Remainder(sh.nums[1].v-ang, 360)
		if !gvWithin(sh.nums[0], mag) || !gvWithin(gvNum{d, sh.nums[1].half}, 0) {
			return fmt.Errorf("reference %.7g∠%.5g° %s", mag, ang, sh.unit)
		}
		if sh.nums[1].half > 0.05*(1+1e-9) {
			return fmt.Errorf("angle shown to less than 0.1°")
		}
		main = sh.nums[0]
	case "rect":
		if !gvWithin(sh.nums[0], real(ref)) || !gvWithin(sh.nums[1], imag(ref)) {
			return fmt.Errorf("reference %.7g%+.7gj %s", real(ref), imag(ref), sh.unit)
		}
		main = sh.nums[0]
		if math.Abs(sh.nums[1].v) > math.Abs(main.v) {
			main = sh.nums[1]
		}
	}
	if !gvEnoughDigits(main, digits) {
		return fmt.Errorf("fewer than %d significant figures", digits)
	}
	return nil
}

// TestGoldenValuesReader checks the reader above on the forms a sheet writes,
// each worked by hand: the number, half a unit of its last digit, the unit.
func TestGoldenValuesReader(t *testing.T) {
	cases := []struct {
		text  string
		form  string
		nums  []gvNum // in the shown unit
		scale float64
		unit  string
	}{
		{"133.2∠-30.68° A", "polar", []gvNum{{133.2, 0.05}, {-30.68, 0.005}}, 1, "A"},
		{"9.426 + j3.450 kVA", "rect", []gvNum{{9.426, 0.0005}, {3.45, 0.0005}}, 1e3, "VA"},
		{"(935.8+j60.0) mΩ", "rect", []gvNum{{935.8, 0.05}, {60, 0.05}}, 1e-3, "Ω"},
		{"-j6.682 Ω", "rect", []gvNum{{0, 0.0005}, {-6.682, 0.0005}}, 1, "Ω"},
		{"-0.5000+j0.8660", "rect", []gvNum{{-0.5, 0.00005}, {0.866, 0.00005}}, 1, ""},
		{"56.10 kvar", "real", []gvNum{{56.1, 0.005}}, 1e3, "var"},
		{"7.436e4 V", "real", []gvNum{{74360, 5}}, 1, "V"},
		{"1.025×10^-13 V", "real", []gvNum{{1.025e-13, 0.5e-16}}, 1, "V"},
		{"6.000 %", "real", []gvNum{{6, 0.0005}}, 0.01, ""},
		{"476.4 µF", "real", []gvNum{{476.4, 0.05}}, 1e-6, "F"},
		{"1.376 mΩ/m", "real", []gvNum{{1.376, 0.0005}}, 1e-3, "Ω/m"},
		{"1.150 Ω/km", "real", []gvNum{{1.15, 0.0005}}, 1e-3, "Ω/m"},
		{"30.68°", "real", []gvNum{{30.68, 0.005}}, 1, "°"},
		{"1089", "real", []gvNum{{1089, 0.5}}, 1, ""},
	}
	for _, c := range cases {
		sh, err := gvParse(c.text)
		if err != nil {
			t.Errorf("%q: %v", c.text, err)
			continue
		}
		scale, unit, err := gvUnit(sh.unit)
		if err != nil || sh.form != c.form || unit != c.unit || math.Abs(scale/c.scale-1) > 1e-12 || len(sh.nums) != len(c.nums) {
			t.Errorf("%q: read as %s %v in %q (scale %g, %q, %v)", c.text, sh.form, sh.nums, sh.unit, scale, unit, err)
			continue
		}
		for i, n := range c.nums {
			if math.Abs(sh.nums[i].v-n.v) > 1e-12*math.Abs(n.v) || math.Abs(sh.nums[i].half/n.half-1) > 1e-9 {
				t.Errorf("%q: number %d read as %v, want %v", c.text, i, sh.nums[i], n)
			}
		}
	}
	// The digit rule: 133.2 stands for [133.15, 133.25].
	if n := (gvNum{133.2, 0.05}); !gvWithin(n, 133.2019) || gvWithin(n, 133.26) || !gvEnoughDigits(n, 4) || gvEnoughDigits(n, 5) {
		t.Error("digit rule misread for 133.2")
	}
	for _, bad := range []string{"12 furlongs", "1.2.3 V", "abc"} {
		if sh, err := gvParse(bad); err == nil {
			if _, _, err := gvUnit(sh.unit); err == nil {
				t.Errorf("%q read as a value", bad)
			}
		}
	}
}
