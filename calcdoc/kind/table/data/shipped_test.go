package data

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"calcdoc/expr"
)

// The reference tables shipped in examples/data (their sources are named
// in examples/data/README.md).

func shipped(t *testing.T, name string) *Table {
	t.Helper()
	path := filepath.Join("..", "..", "..", "..", "examples", "data", name)
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	tab, err := ParseCSV(name, b)
	if err != nil {
		t.Fatal(err)
	}
	tab.Name = strings.TrimSuffix(name, ".csv")
	return tab
}

// value is column col of the row whose key is key (in the columns' own
// units, as written in the file), or NaN for a gap.
func value(t *testing.T, tab *Table, col string, key float64) float64 {
	t.Helper()
	j, err := tab.Col(col)
	if err != nil {
		t.Fatal(err)
	}
	k := key
	if u := tab.Cols[0].Unit; u != nil {
		k = key*u.Scale + u.Offset
	}
	i := tab.find(k)
	if i < 0 {
		t.Fatalf("%s has no row %v", tab.Path, key)
	}
	c := tab.Rows[i].Cells[j]
	if c.Gap {
		return math.NaN()
	}
	u := tab.Cols[j].Unit
	return (c.V - u.Offset) / u.Scale
}

// A sample of rows of IEC 60228:2004, Table 2, class 2 conductors, maximum
// DC resistance at 20 °C in Ω/km: plain copper and aluminium. The values
// here are written from memory of the standard's table (the file says so
// too), typed a second time to catch a slip in the file.
func TestShippedIEC60228Sample(t *testing.T) {
	tab := shipped(t, "iec60228-class2-r20.csv")
	for _, c := range []struct{ s, cu, al float64 }{
		{1.5, 12.1, math.NaN()},
		{2.5, 7.41, math.NaN()},
		{10, 1.83, 3.08},
		{35, 0.524, 0.868},
		{95, 0.193, 0.320},
		{240, 0.0754, 0.125},
		{630, 0.0283, 0.0469},
	} {
		if got := value(t, tab, "R_cu", c.s); got != c.cu {
			t.Errorf("R_cu(%v mm²) = %v, IEC 60228 Table 2 gives %v Ω/km", c.s, got, c.cu)
		}
		if got := value(t, tab, "R_al", c.s); !(got == c.al || math.IsNaN(got) && math.IsNaN(c.al)) {
			t.Errorf("R_al(%v mm²) = %v, IEC 60228 Table 2 gives %v Ω/km", c.s, got, c.al)
		}
	}
}

// Every row against physics from outside the table: a stranded conductor's
// maximum resistance lies a little above that of a solid bar of its
// nominal cross-section, R = ρ/S, with ρ20 = 1/58 Ω·mm²/m for annealed
// copper (IEC 60028, the international standard of resistance for copper)
// and 0.028264 Ω·mm²/m for aluminium (IEC 60889, hard-drawn aluminium
// wire), both from memory: the ratio R·S/ρ must lie in [1.00, 1.15] (the
// lay of the strands and the tolerance on the cross-section; common
// practice puts it near 1.02 to 1.13). A digit slipped in a row, or a row
// shifted by one size, leaves that band.
func TestShippedIEC60228AgainstResistivity(t *testing.T) {
	tab := shipped(t, "iec60228-class2-r20.csv")
	rho := map[string]float64{"R_cu": 1.0 / 58 * 1e3, "R_al": 0.028264 * 1e3} // Ω·mm²/km
	if len(tab.Rows) != 22 {
		t.Errorf("%d rows, want 22 (0.5 to 630 mm²)", len(tab.Rows))
	}
	for i := range tab.Rows {
		s := tab.Rows[i].Cells[0].V * 1e6 // mm²
		for j := 1; j < 3; j++ {
			c := tab.Rows[i].Cells[j]
			if c.Gap {
				continue
			}
			r := c.V * 1e3 // Ω/km
			if ratio := r * s / rho[tab.Cols[j].Name]; ratio < 1.0 || ratio > 1.15 {
				t.Errorf("%s of %v mm² = %v Ω/km: R·S/ρ = %.3f, outside [1.00, 1.15]", tab.Cols[j].Name, s, r, ratio)
			}
		}
	}
}

// The temperature coefficients at 20 °C: 3.93e-3 1/K (copper) and 4.03e-3
// 1/K (aluminium), IEC 60287-1-1, Table 1 (from memory). Outside check:
// alpha_20 = 1/(β + 20 K) with β = 234.5 K for copper and 228 K for
// aluminium (IEC 60949, from memory): 1/254.5 = 0.0039293 and 1/248 =
// 0.0040323, which round to the table's three figures.
func TestShippedTemperatureCoefficients(t *testing.T) {
	tab := shipped(t, "temperature-coefficients.csv")
	for _, c := range []struct {
		col       string
		want, bet float64
	}{{"alpha_cu", 0.00393, 234.5}, {"alpha_al", 0.00403, 228}} {
		got := value(t, tab, c.col, 20)
		if got != c.want {
			t.Errorf("%s at 20 °C = %v, want %v", c.col, got, c.want)
		}
		if d := math.Abs(got - 1/(c.bet+20)); d > 0.5e-5 {
			t.Errorf("%s = %v differs from 1/(%v + 20) = %v by more than the last figure", c.col, got, c.bet, 1/(c.bet+20))
		}
	}
	// the key is an absolute temperature, 20 °C = 293.15 K
	if k := tab.Key(0); !k.AbsTemp || real(k.Z) != 293.15 {
		t.Errorf("key %v (absolute %v)", k.Z, k.AbsTemp)
	}
	// looked up by 20 °C, not by the difference 293.15 K
	if v, _, err := tab.Lookup("alpha_cu", &expr.Scalar{Z: 293.15, Dim: expr.DimTemperature, AbsTemp: true}); err != nil || real(v.Z) != 0.00393 {
		t.Errorf("alpha_cu(20 °C) = %v %v", v, err)
	}
	_, _, err := tab.Lookup("alpha_cu", &expr.Scalar{Z: 293.15, Dim: expr.DimTemperature})
	if err == nil || !strings.Contains(err.Error(), "the key 293.1 K is a temperature difference, but the key theta_0 of temperature-coefficients is a temperature in °C") {
		t.Errorf("error %v", err)
	}
}

// The R10 series of preferred numbers (ISO 3): the i-th value is 10^(i/10)
// rounded; ISO 3's rounded values lie within 1.3 % of it. From 1 A: the
// row i (from 0) is 10^(i/10) A.
func TestShippedR10(t *testing.T) {
	tab := shipped(t, "iec60059-r10-currents.csv")
	if len(tab.Rows) != 39 {
		t.Fatalf("%d rows, want 39 (1 A to 6300 A)", len(tab.Rows))
	}
	for i, r := range tab.Rows {
		exact := math.Pow(10, float64(i)/10)
		if d := math.Abs(r.Cells[0].V/exact - 1); d > 0.013 {
			t.Errorf("row %d: %s A is %.2f %% from 10^(%d/10) = %.4f", i, r.Cells[0].Text, 100*d, i, exact)
		}
	}
	// ISO 3, R10: the rounded values of one decade (from memory)
	for i, want := range []float64{1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8} {
		if got := tab.Rows[i].Cells[0].V; got != want || tab.Rows[i+20].Cells[0].V != want*100 {
			t.Errorf("row %d: %v, ISO 3 R10 gives %v", i, got, want)
		}
	}
}

// IEC 60898-1:2015, 5.3.2, the preferred rated currents of circuit-breakers
// (from memory): 6, 8, 10, 13, 16, 20, 25, 32, 40, 50, 63, 80, 100, 125 A.
func TestShippedIEC60898Currents(t *testing.T) {
	tab := shipped(t, "iec60898-1-rated-currents.csv")
	want := []float64{6, 8, 10, 13, 16, 20, 25, 32, 40, 50, 63, 80, 100, 125}
	if len(tab.Rows) != len(want) {
		t.Fatalf("%d rows, want %d", len(tab.Rows), len(want))
	}
	for i, w := range want {
		if got := tab.Rows[i].Cells[0].V; got != w {
			t.Errorf("row %d: %v A, IEC 60898-1 gives %v A", i, got, w)
		}
	}
	// the next rating up from a design current of 27.3 A is 32 A
	v, _, err := tab.Up(&expr.Scalar{Z: 27.3, Dim: expr.DimCurrent})
	if err != nil || real(v.Z) != 32 {
		t.Errorf("up(27.3 A) = %v %v, want 32 A", v, err)
	}
}
