package expr

import (
	"math"
	"strconv"
	"strings"
	"testing"
)

// Formatting rules of LANGUAGE §4: a value is shown in the unit its line
// names, else in the default unit of its dimension with an SI prefix that
// puts the number in [1, 1000); voltages and currents polar, impedances,
// admittances and powers rectangular; a negligible imaginary part shown as
// a real number; power in W when real and VA when complex; digits 2..12
// significant figures (LANGUAGE §1, "digits").

// shown evaluates the last line of src and formats it with the display of
// its assignment, if any.
func shown(t *testing.T, src string, digits int) string {
	t.Helper()
	b := runBlock(src)
	if errs := b.allErrors(); len(errs) > 0 {
		t.Fatalf("%q: %v", src, errs[0])
	}
	r := b.results[len(b.results)-1]
	var d *Display
	switch s := r.Stmt.(type) {
	case *Assign:
		d = s.Display
	case *ExprStmt:
		d = s.Display
	}
	return FormatValue(r.Value, d, digits)
}

func TestFormat(t *testing.T) {
	tests := []struct {
		name, src, want string
	}{
		// polar for currents and voltages, rect for impedances (LANGUAGE §4)
		{"current polar", "46 A∠-53.13°", "46.00∠-53.13° A"},
		{"voltage polar", "(1 + j) V", "1.414∠45.00° V"},
		{"impedance rect", "(3 + j4) Ω", "3.000 + j4.000 Ω"},
		{"impedance rect negative", "(3 - j4) Ω", "3.000 - j4.000 Ω"},
		{"admittance rect", "(1.2 + j3.4) mS", "1.200 + j3.400 mS"},
		{"power real is W", "2 V * 3 A", "6.000 W"},
		{"power complex is VA", "(100 + j50) VA", "100.0 + j50.0 VA"},
		{"complex power from V and I", "V = 230 V\nI = 10 A∠-36.87°\nV*conj(I)", "1.840 + j1.380 kVA"},
		{"reactive power alone is complex", "j500 var", "j500.0 VA"},
		// prefixes in [1, 1000) (LANGUAGE §4; prefixes of SI Brochure table 7)
		{"kilo", "1500 V", "1.500 kV"},
		{"milli", "0.0015 A", "1.500 mA"},
		{"micro", "4.7 µF", "4.700 µF"},
		{"pico", "0.2 nF", "200.0 pF"},
		{"mega", "3.3e6 Ω", "3.300 MΩ"},
		{"giga", "2.5e9 W", "2.500 GW"},
		{"tera", "1e12 Wh / 1 h", "1.000 TW"},
		{"rounding carries into the next prefix", "999.96 V", "1.000 kV"},
		{"below pico: exponent in the base unit", "1e-13 F", "1.000e-13 F"},
		{"above tera: exponent in the base unit", "1e15 V", "1.000e15 V"},
		{"area prefix in steps of 10^6", "16 mm^2", "16.00 mm²"},
		{"ohm per metre", "0.2 Ω/km", "200.0 µΩ/m"},
		{"hertz", "50 Hz", "50.00 Hz"},
		{"henry", "3 mH", "3.000 mH"},
		{"gram", "5 g", "5.000 g"},
		{"kilogram", "1 kg", "1.000 kg"},
		{"hour in seconds", "1 h", "3.600 ks"},
		{"zero", "0 V", "0.000 V"},
		// a negligible imaginary part is shown as a real number
		{"tiny imaginary part", "(100 + j1e-14) V", "100.0 V"},
		{"phasor at 0°", "1 V∠0°", "1.000 V"},
		{"phasor at 180° is real", "10 A∠180°", "-10.00 A"},
		{"angle near -180 shown as 180", "10 A∠-179.999999°", "10.00∠180.0° A"},
		// angles in degrees (LANGUAGE §3)
		{"arg in degrees", "arg(j)", "90.00°"},
		{"degrees", "30°", "30.00°"},
		{"plain number", "0.5", "0.5000"},
		{"percent is a plain number", "5 %", "0.05000"},
		// the unit and form a line names (LANGUAGE §2)
		{"display kA polar", "I[kA polar] = 1500 A∠-30°", "1.500∠-30.00° kA"},
		{"display unit", "V[kV] = 11000 V", "11.00 kV"},
		// both parts get the decimals of the larger one; a negligible real part is dropped
		{"display rect of a current", "I[rect] = 5 A∠90°", "j5.000 A"},
		{"display polar of an impedance", "Z[polar] = (3 + j4) Ω", "5.000∠53.13° Ω"},
		{"display unit Ω rect", "Z[Ω rect] = (0.12 + j0.08) kΩ", "120.0 + j80.0 Ω"},
		{"display deg", "phi[deg] = 0.5 rad", "28.65°"},
		// a matrix
		{"matrix", "[1 V; 2 A]", "[1.000 V; 2.000 A]"},
		{"matrix 2x2", "[1 Ω, 2 Ω; 3 Ω, 4 Ω]", "[1.000 Ω, 2.000 Ω; 3.000 Ω, 4.000 Ω]"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := shown(t, tc.src, 4); got != tc.want {
				t.Errorf("%q shown as %q, want %q", tc.src, got, tc.want)
			}
		})
	}
}

func TestFormatDigits(t *testing.T) {
	// LANGUAGE §1: digits, significant figures shown, 2 to 12.
	want := map[int]string{
		2: "1.2 kV", 3: "1.23 kV", 4: "1.235 kV", 5: "1.2346 kV", 6: "1.23457 kV",
		7: "1.234568 kV", 8: "1.2345678 kV", 9: "1.23456780 kV", 10: "1.234567800 kV",
		11: "1.2345678000 kV", 12: "1.23456780000 kV",
	}
	for d := 2; d <= 12; d++ {
		t.Run(strconv.Itoa(d), func(t *testing.T) {
			if got := shown(t, "1234.5678 V", d); got != want[d] {
				t.Errorf("digits %d: %q, want %q", d, got, want[d])
			}
		})
	}
	t.Run("polar with 2 and 12 digits", func(t *testing.T) {
		if got := shown(t, "46 A∠-53.13°", 2); got != "46∠-53° A" {
			t.Errorf("got %q", got)
		}
		if got := shown(t, "46 A∠-53.13°", 12); got != "46.0000000000∠-53.1300000000° A" {
			t.Errorf("got %q", got)
		}
	})
}

// TestPrefixRange: for every magnitude from 1 pV to 999 TV the shown
// number lies in [1, 1000) and the prefix is the one that makes it so
// (LANGUAGE §4; prefix factors from SI Brochure table 7).
func TestPrefixRange(t *testing.T) {
	factor := map[string]float64{"p": 1e-12, "n": 1e-9, "µ": 1e-6, "m": 1e-3, "": 1, "k": 1e3, "M": 1e6, "G": 1e9, "T": 1e12}
	for e := -12.0; e < 15; e += 0.25 {
		x := 1.7 * math.Pow(10, e)
		if x >= 999.5e12 {
			continue
		}
		name := strconv.FormatFloat(x, 'g', 4, 64)
		t.Run(name, func(t *testing.T) {
			sh := FormatScalar(Quantity(complex(x, 0), DimVoltage), nil, 4)
			if sh.Kind != ShownReal || !strings.HasSuffix(sh.Unit, "V") {
				t.Fatalf("%v V shown as %+v", x, sh)
			}
			pf := strings.TrimSuffix(sh.Unit, "V")
			f, ok := factor[pf]
			if !ok {
				t.Fatalf("unexpected prefix %q", pf)
			}
			n, err := strconv.ParseFloat(sh.A, 64)
			if err != nil || n < 1 || n >= 1000 {
				t.Fatalf("%v V shown as %s: number not in [1, 1000)", x, sh.String())
			}
			if math.Abs(n*f-x) > 5e-4*x {
				t.Errorf("%v V shown as %s", x, sh.String())
			}
		})
	}
}

func TestShownString(t *testing.T) {
	// format.go Shown.String: the layouts.
	tests := []struct {
		name string
		sh   Shown
		want string
	}{
		{"real", Shown{Kind: ShownReal, A: "1.595", Unit: "kA"}, "1.595 kA"},
		{"polar", Shown{Kind: ShownPolar, A: "1.595", B: "-33.69", Unit: "kA"}, "1.595∠-33.69° kA"},
		{"rect", Shown{Kind: ShownRect, A: "3.000", B: "4.000", Unit: "Ω"}, "3.000 + j4.000 Ω"},
		{"rect negative", Shown{Kind: ShownRect, A: "3.000", B: "-4.000", Unit: "Ω"}, "3.000 - j4.000 Ω"},
		{"imaginary", Shown{Kind: ShownRect, B: "-318.3", Unit: "Ω"}, "-j318.3 Ω"},
		{"degrees", Shown{Kind: ShownReal, A: "36.87", Unit: "°"}, "36.87°"},
		{"no unit", Shown{Kind: ShownReal, A: "2.000"}, "2.000"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := tc.sh.String(); got != tc.want {
				t.Errorf("%q, want %q", got, tc.want)
			}
		})
	}
}

func TestCheckDisplay(t *testing.T) {
	// LANGUAGE §2: a unit of another dimension is an error.
	v := Quantity(3, DimVoltage)
	if err := CheckDisplay(v, &Display{Unit: &Unit{Text: "kV", Scale: 1e3, Dim: DimVoltage}}); err != nil {
		t.Errorf("kV for a voltage: %v", err)
	}
	err := CheckDisplay(v, &Display{Unit: &Unit{Text: "kA", Scale: 1e3, Dim: DimCurrent}})
	if err == nil || !strings.Contains(err.Error(), "the unit kA is a current, but the value is a voltage") {
		t.Errorf("kA for a voltage: %v", err)
	}
}
