package expr

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"
)

// TestAngleRule: each clause of the angle rule of LANGUAGE.md section 3,
// and the operations the rule does not name (which give no angle).
func TestAngleRule(t *testing.T) {
	tests := []struct {
		name  string
		src   string
		angle bool
	}{
		// a literal in °, deg or rad
		{"degree sign", "30°", true},
		{"deg", "30 deg", true},
		{"rad", "0.5 rad", true},
		{"pi in rad", "(pi/6) rad", true},
		{"vector of degrees", "v = [30, 60]°\nv(2)", true},
		// arg, atan2, and asin/acos/atan of a real
		{"arg", "arg(1 + j)", true},
		{"atan2", "atan2(1 A, 2 A)", true},
		{"asin of a real", "asin(0.5)", true},
		{"acos of a real", "acos(0.5)", true},
		{"atan of a real", "atan(2)", true},
		{"asin outside its domain", "asin(2)", false},
		{"atan of a complex number", "atan(j0.5)", false},
		// −a; a ± b of two angles
		{"negated", "-(30°)", true},
		{"negated vector entry", "v = -[30°; 60°]\nv(1)", true},
		{"sum of two angles", "30° + 0.1 rad", true},
		{"difference of two angles", "30° - 10°", true},
		{"angle plus a plain number", "30° + 1", false},
		{"plain number minus an angle", "1 - 30°", false},
		// a·k or a/k with k a plain number that is not an angle
		{"angle times plain", "30° * 2", true},
		{"plain times angle", "2 * 30°", true},
		{"angle over plain", "30° / 3", true},
		{"plain over angle", "3 / 30°", false},
		{"angle times angle", "30° * 30°", false},
		{"angle over angle", "60° / 30°", false},
		{"angle times a quantity", "30° * 2 V", false},
		// names and parameters holding an angle
		{"name", "phi = 30°\nphi", true},
		{"parameter", "f(a) = 2 * a\nf(15°)", true},
		{"parameter given a plain number", "f(a) = 2 * a\nf(15)", false},
		// not angles
		{"pi", "pi", false},
		{"pi over six", "pi / 6", false},
		{"plain number", "0.5", false},
		{"sin of an angle", "sin(30°)", false},
		{"abs of an angle", "abs(-30°)", false},
		{"re of an angle", "re(30°)", false},
		{"max of angles", "max(10°, 20°)", false},
		{"power of an angle", "(30°)^2", false},
		{"bars around an angle", "|-30°|", false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if s := evalScalar(t, tc.src); s.Angle != tc.angle {
				t.Errorf("%q: Angle = %v, want %v", tc.src, s.Angle, tc.angle)
			}
		})
	}
}

// TestAngleRequired: right of ∠ and as the second argument of polar a
// value must be an angle; a bare number is an error that names the two
// ways to write it (LANGUAGE.md section 3, with its example message).
func TestAngleRequired(t *testing.T) {
	tests := []struct {
		name, src, pos, msg string
	}{
		{"bare negative number", "230 V∠-120", "1:7", "the angle -120 has no unit: write -120° (degrees) or -120 rad"},
		{"ascii spelling", "230 V /_ 30", "1:10", "the angle 30 has no unit: write 30° (degrees) or 30 rad"},
		{"bare sum", "1∠(120 - 30)", "1:3", "the angle (120 - 30) has no unit: write (120 - 30)° (degrees) or (120 - 30) rad"},
		{"polar", "polar(230 V, -120)", "1:14", "the angle -120 has no unit: write -120° (degrees) or -120 rad"},
		{"pi is not an angle", "1∠pi/6", "1:3", "the angle after ∠, pi, is the plain number 3.142, not an angle (pi is not one either): write it with an angle unit, e.g. (pi) rad"},
		{"pi in parentheses", "1∠(pi/6)", "1:3", "e.g. (pi / 6) rad"},
		{"plain name", "k = 2\n1∠k", "2:3", "the angle after ∠, k, is the plain number 2, not an angle"},
		{"polar with a plain name", "k = 2\npolar(1, k)", "2:10", "the second argument of polar, k, is the plain number 2, not an angle"},
		{"abs drops the mark", "1∠abs(-30°)", "1:3", "is the plain number 0.5236, not an angle"},
		{"quantity", "1∠2 V", "1:3", "the angle after ∠ must be an angle (e.g. 30° or 0.5 rad), not 2 V"},
		{"parameter given a plain number", "f(a) = 1∠a\nf(2)", "2:1", "in f (defined at line 1): the angle after ∠, a, is the plain number 2"},
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

// TestAngleAccepted: the values of phasors whose angle is an angle by the
// rule; the reference is math/cmplx.Rect with the angle in radians.
func TestAngleAccepted(t *testing.T) {
	deg := math.Pi / 180
	tests := []struct {
		name string
		src  string
		want complex128
	}{
		{"degrees", "230∠-120°", cmplx.Rect(230, -120*deg)},
		{"radians", "2∠(pi/6) rad", cmplx.Rect(2, math.Pi/6)},
		{"name plus degrees", "phi = 10°\n1∠(phi + 30°)", cmplx.Rect(1, 40*deg)},
		{"scaled angle", "phi = 10°\n1∠(3 * phi)", cmplx.Rect(1, 30*deg)},
		{"arg", "1∠arg(1 + j)", cmplx.Rect(1, 45*deg)},
		{"acos of a power factor", "1∠-acos(0.8)", cmplx.Rect(1, -math.Acos(0.8))},
		{"parameter", "f(a) = 5∠a\nf(90°)", cmplx.Rect(5, 90*deg)},
		{"polar", "polar(2, 0.5 rad)", cmplx.Rect(2, 0.5)},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := evalScalar(t, tc.src)
			if cmplx.Abs(s.Z-tc.want) > 1e-12*cmplx.Abs(tc.want) {
				t.Errorf("%q = %v, want %v (math/cmplx.Rect)", tc.src, s.Z, tc.want)
			}
		})
	}
}
