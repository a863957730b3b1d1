package phasors_test

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"calcdoc/calcdoc/kind/phasors"
	"calcdoc/expr"
)

// phFromCalc defines a receiving-end voltage, a line current and a line
// impedance, and the sending-end voltage they give (lines 1-7).
var phFromCalc = []string{
	"```calc",
	"V_r = 230 V",           // line 2
	"I_L = 40 A∠-30°",       // line 3
	"Z_c = (0.5 + j3) Ω",    // line 4
	"V_s = V_r + I_L * Z_c", // line 5
	"bad = 1 V + 1 A",       // line 6: fails
	"```",
	"",
}

// TestPhasorsTipToTail: "I_L*Z_c from V_r" starts at V_r's tip, so the sum
// V_s = V_r + I_L·Z_c closes the triangle: the drop's tail is V_r and its
// tip is V_s. Reference: hand derivation with math/cmplx,
// I_L·Z_c = 40∠−30° A · (0.5 + j3) Ω = 40·(cos30° − j sin30°)(0.5 + j3)
// = (34.641 − j20)(0.5 + j3) = (17.32 + 60) + j(103.92 − 10)
// = 77.32 + j93.92 V, so V_s = 307.32 + j93.92 V.
func TestPhasorsTipToTail(t *testing.T) {
	d := phDoc(append(append([]string{}, phFromCalc...),
		"```phasors V_r, I_L*Z_c from V_r, V_s", // line 9
		"```")...)
	if len(d.Errors) != 1 || d.Errors[0].Pos.Line() != 6 {
		t.Fatalf("want only the error of line 6, got %v", d.Errors)
	}
	res := phBlock(t, d, "phasors").Result.(*phasors.Phasors)
	if len(res.Items) != 3 {
		t.Fatalf("%d items, want 3", len(res.Items))
	}
	drop := cmplx.Rect(40, -30*math.Pi/180) * complex(0.5, 3)
	hand := complex(40*math.Sqrt(3)/2*0.5+20*3, 40*math.Sqrt(3)/2*3-20*0.5)
	if cmplx.Abs(drop-hand) > 1e-12 {
		t.Fatalf("hand derivation %v disagrees with math/cmplx %v", hand, drop)
	}
	vr, it, vs := res.Items[0], res.Items[1], res.Items[2]
	for _, x := range res.Items {
		if !x.OK() || x.Unit != "V" {
			t.Fatalf("%s: not drawn (%v) or unit %q", x.Text, x.Err, x.Unit)
		}
	}
	if it.Text != "I_L*Z_c" || it.FromName != "V_r" || it.From != vr {
		t.Errorf("entry %q from %q (%p), want I_L*Z_c from V_r", it.Text, it.FromName, it.From)
	}
	// "```phasors V_r, I_L*Z_c from V_r": I_L at column 17, its V_r at 30
	if it.Pos.Position().InFile() != (expr.Position{Line: 9, Col: 17}) || it.FromPos.Position().InFile() != (expr.Position{Line: 9, Col: 30}) {
		t.Errorf("positions %v and %v, want 9:17 and 9:30", it.Pos, it.FromPos)
	}
	tail := complex(it.X0, it.Y0)
	tip := tail + complex(it.Re, it.Im)
	if tail != complex(vr.Re, vr.Im) {
		t.Errorf("tail %v, want V_r's tip %v", tail, complex(vr.Re, vr.Im))
	}
	if want := complex(230, 0) + drop; cmplx.Abs(tip-want) > 1e-9 || cmplx.Abs(tip-complex(vs.Re, vs.Im)) > 1e-9 {
		t.Errorf("tip %v, want V_s = %v", tip, want)
	}
	if vs.X0 != 0 || vs.Y0 != 0 || vs.From != nil {
		t.Errorf("V_s drawn from (%g, %g), want the origin", vs.X0, vs.Y0)
	}
}

// TestPhasorsFromChain: a chain a, b from a, c from b puts each tail at
// the previous tip (hand sums: 230, then +j100, then −30: tips 230,
// 230 + j100, 200 + j100).
func TestPhasorsFromChain(t *testing.T) {
	d := phDoc("```calc", "a = 230 V", "b = j100 V", "c = -30 V", "```", "",
		"```phasors a, b from a, c from b", "```")
	if len(d.Errors) != 0 {
		t.Fatalf("errors: %v", d.Errors)
	}
	res := phBlock(t, d, "phasors").Result.(*phasors.Phasors)
	wantTips := []complex128{230, complex(230, 100), complex(200, 100)}
	for k, it := range res.Items {
		if tip := complex(it.X0+it.Re, it.Y0+it.Im); cmplx.Abs(tip-wantTips[k]) > 1e-9 {
			t.Errorf("%s: tip %v, want %v", it.Text, tip, wantTips[k])
		}
	}
}

func TestPhasorsFromErrors(t *testing.T) {
	cases := []struct {
		name string
		line string
		col  int
		msg  string
	}{
		// "```phasors I_L*Z_c from V_r": V_r at column 25
		{"not listed", "```phasors I_L*Z_c from V_r", 25, "V_r is not an earlier entry"},
		// "```phasors V_s, I_L*Z_c from V_r, V_r": V_r comes later
		{"listed later", "```phasors V_s, I_L*Z_c from V_r, V_r", 30, "V_r is not an earlier entry"},
		// "```phasors V_r, I_L from V_r": a current from a voltage, at I_L (17)
		{"dimension mismatch", "```phasors V_r, I_L from V_r", 17, "I_L is a current and V_r is a voltage"},
		// nothing after "from" (columns 25-28): the error at column 29
		{"no name", "```phasors V_r, I_L*Z_c from", 29, "after from comes the name"},
		{"not a name", "```phasors V_r, I_L*Z_c from V_r + V_r", 30, "after from comes the name of an earlier entry"},
		{"nothing before from", "```phasors V_r, from V_r", 17, "nothing before from"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := phDoc(append(append([]string{}, phFromCalc...), c.line, "```")...)
			b := phBlock(t, d, "phasors")
			if len(b.Errors) != 1 {
				t.Fatalf("want one error, got %v", b.Errors)
			}
			e := b.Errors[0]
			if e.Pos.Position().InFile() != (expr.Position{Line: 9, Col: c.col}) || !strings.Contains(e.Msg, c.msg) {
				t.Errorf("error %v, want at 9:%d containing %q", e, c.col, c.msg)
			}
		})
	}
}

// TestPhasorsFromUnavailable: drawn from an entry that has no value (its
// name's definition failed), an entry is not evaluated, not a new error.
func TestPhasorsFromUnavailable(t *testing.T) {
	d := phDoc(append(append([]string{}, phFromCalc...), "```phasors bad, V_r from bad", "```")...)
	if len(d.Errors) != 1 || d.Errors[0].Pos.Line() != 6 {
		t.Fatalf("want only the error of line 6, got %v", d.Errors)
	}
	res := phBlock(t, d, "phasors").Result.(*phasors.Phasors)
	if it := res.Items[1]; it.OK() || it.Unavailable == nil || it.Unavailable.Name != "bad" {
		t.Errorf("V_r from bad: ok %v, unavailable %v", it.OK(), it.Unavailable)
	}
}
