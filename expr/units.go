package expr

import (
	"fmt"
	"math"
	"sort"
	"strings"
	"sync"
)

// Dim is a physical dimension: the exponents of the seven SI base
// quantities, in the order length (m), mass (kg), time (s), electric
// current (A), thermodynamic temperature (K), amount of substance (mol) and
// luminous intensity (cd). The zero Dim is dimensionless.
type Dim [7]int8

// The base dimensions.
var (
	DimLength      = Dim{1, 0, 0, 0, 0, 0, 0}
	DimMass        = Dim{0, 1, 0, 0, 0, 0, 0}
	DimTime        = Dim{0, 0, 1, 0, 0, 0, 0}
	DimCurrent     = Dim{0, 0, 0, 1, 0, 0, 0}
	DimTemperature = Dim{0, 0, 0, 0, 1, 0, 0}
	DimAmount      = Dim{0, 0, 0, 0, 0, 1, 0}
	DimLuminous    = Dim{0, 0, 0, 0, 0, 0, 1}
)

// Derived dimensions used by the default display units.
var (
	DimVoltage     = Dim{2, 1, -3, -1, 0, 0, 0}
	DimImpedance   = Dim{2, 1, -3, -2, 0, 0, 0}
	DimAdmittance  = Dim{-2, -1, 3, 2, 0, 0, 0}
	DimPower       = Dim{2, 1, -3, 0, 0, 0, 0}
	DimEnergy      = Dim{2, 1, -2, 0, 0, 0, 0}
	DimFrequency   = Dim{0, 0, -1, 0, 0, 0, 0}
	DimCapacitance = Dim{-2, -1, 4, 2, 0, 0, 0}
	DimInductance  = Dim{2, 1, -2, -2, 0, 0, 0}
	DimCharge      = Dim{0, 0, 1, 1, 0, 0, 0}
	DimFlux        = Dim{2, 1, -2, -1, 0, 0, 0}
	DimFluxDensity = Dim{0, 1, -2, -1, 0, 0, 0}
	DimForce       = Dim{1, 1, -2, 0, 0, 0, 0}
	DimPressure    = Dim{-1, 1, -2, 0, 0, 0, 0}
	DimArea        = Dim{2, 0, 0, 0, 0, 0, 0}
	DimVolume      = Dim{3, 0, 0, 0, 0, 0, 0}
)

// IsZero reports whether d is dimensionless.
func (d Dim) IsZero() bool { return d == Dim{} }

// Mul is the dimension of a product.
func (d Dim) Mul(e Dim) Dim {
	for i := range d {
		d[i] += e[i]
	}
	return d
}

// Div is the dimension of a quotient.
func (d Dim) Div(e Dim) Dim {
	for i := range d {
		d[i] -= e[i]
	}
	return d
}

// Pow is the dimension raised to an integer power.
func (d Dim) Pow(n int) Dim {
	for i := range d {
		d[i] *= int8(n)
	}
	return d
}

// MaxExponent bounds the exponent of each base unit in a value's
// dimension. Within it, the product or quotient of two dimensions cannot
// overflow the int8 exponents, so a larger result is reported, never
// wrapped around.
const MaxExponent = 40

// InRange reports whether every exponent of d lies within ±MaxExponent.
func (d Dim) InRange() bool {
	for _, x := range d {
		if x > MaxExponent || x < -MaxExponent {
			return false
		}
	}
	return true
}

// dimsInRange reports whether every dimension in v is InRange.
func dimsInRange(v Value) bool {
	switch x := v.(type) {
	case *Scalar:
		return x.Dim.InRange()
	case *Matrix:
		for i := range x.E {
			if !x.E[i].Dim.InRange() {
				return false
			}
		}
	}
	return true
}

// fitsPow reports whether every exponent times n stays within int8 range.
func (d Dim) fitsPow(n int) bool {
	for _, x := range d {
		if v := int(x) * n; v > 100 || v < -100 {
			return false
		}
	}
	return true
}

var baseSymbols = [7]string{"m", "kg", "s", "A", "K", "mol", "cd"}

// SI writes d as a product of SI base units, e.g. "kg·m²·s⁻³·A⁻¹". The
// dimensionless Dim gives "".
func (d Dim) SI() string {
	// conventional order: kg m s A K mol cd
	order := []int{1, 0, 2, 3, 4, 5, 6}
	var parts []string
	for _, i := range order {
		if d[i] == 0 {
			continue
		}
		parts = append(parts, baseSymbols[i]+superscript(int(d[i])))
	}
	return strings.Join(parts, "·")
}

func superscript(n int) string {
	if n == 1 {
		return ""
	}
	const digits = "⁰¹²³⁴⁵⁶⁷⁸⁹"
	ds := []rune(digits)
	var b strings.Builder
	if n < 0 {
		b.WriteRune('⁻')
		n = -n
	}
	s := fmt.Sprint(n)
	for _, c := range s {
		b.WriteRune(ds[c-'0'])
	}
	return b.String()
}

// String names the dimension by its coherent SI unit where one is named in
// the default display table (V, Ω, W, ...), else by base units.
func (d Dim) String() string {
	if d.IsZero() {
		return "1"
	}
	if u := CoherentUnit(d); u != "" {
		return u
	}
	return d.SI()
}

// unitDef is one entry of the unit table.
type unitDef struct {
	sym        string
	scale      float64 // value of 1 unit in coherent SI units
	dim        Dim
	prefixable bool
	angle      bool // an angle unit: values are shown in degrees
	name       string
}

// unitOffsets holds the value of 0 in a unit with an offset, in coherent
// SI units: its values are absolute temperatures (temperature.go).
var unitOffsets = map[string]float64{"°C": CelsiusZero, "degC": CelsiusZero}

// unitTable is the table of unit symbols. A symbol written in a document is
// looked up whole first; only when it is not in the table is it read as an
// SI prefix followed by a prefixable symbol. That rule settles the symbols
// that could be read two ways: "min" is the minute, "Pa" the pascal, "cd"
// the candela, "h" the hour, "T" the tesla, "pu" per-unit; "mm" is the
// millimetre and "ms" the millisecond because "mm" and "ms" are not symbols
// of their own.
var unitTable = map[string]*unitDef{}

func addUnit(u unitDef) {
	c := u
	unitTable[u.sym] = &c
}

func init() {
	for _, u := range []unitDef{
		{"m", 1, DimLength, true, false, "metre"},
		{"g", 1e-3, DimMass, true, false, "gram"},
		{"s", 1, DimTime, true, false, "second"},
		{"A", 1, DimCurrent, true, false, "ampere"},
		{"K", 1, DimTemperature, true, false, "kelvin"},
		{"mol", 1, DimAmount, true, false, "mole"},
		{"cd", 1, DimLuminous, true, false, "candela"},
		{"Hz", 1, DimFrequency, true, false, "hertz"},
		{"N", 1, DimForce, true, false, "newton"},
		{"Pa", 1, DimPressure, true, false, "pascal"},
		{"J", 1, DimEnergy, true, false, "joule"},
		{"W", 1, DimPower, true, false, "watt"},
		{"VA", 1, DimPower, true, false, "volt-ampere"},
		{"var", 1, DimPower, true, false, "var"},
		{"Wh", 3600, DimEnergy, true, false, "watt-hour"},
		{"C", 1, DimCharge, true, false, "coulomb"},
		{"V", 1, DimVoltage, true, false, "volt"},
		{"F", 1, DimCapacitance, true, false, "farad"},
		{"Ω", 1, DimImpedance, true, false, "ohm"},
		{"ohm", 1, DimImpedance, true, false, "ohm"},
		{"S", 1, DimAdmittance, true, false, "siemens"},
		{"Wb", 1, DimFlux, true, false, "weber"},
		{"T", 1, DimFluxDensity, true, false, "tesla"},
		{"H", 1, DimInductance, true, false, "henry"},
		{"min", 60, DimTime, false, false, "minute"},
		{"h", 3600, DimTime, false, false, "hour"},
		{"rad", 1, Dim{}, true, true, "radian"},
		{"°", math.Pi / 180, Dim{}, false, true, "degree"},
		{"deg", math.Pi / 180, Dim{}, false, true, "degree"},
		{"%", 0.01, Dim{}, false, false, "percent"},
		{"pu", 1, Dim{}, false, false, "per-unit"},
	} {
		addUnit(u)
	}
	// degree Celsius: t/°C = T/K − 273.15 (SI Brochure, 9th edition, 2.3.1)
	addUnit(unitDef{sym: "°C", scale: 1, dim: DimTemperature, name: "degree Celsius"})
	addUnit(unitDef{sym: "degC", scale: 1, dim: DimTemperature, name: "degree Celsius"})
	// Alternative spellings of the same characters.
	unitTable["\u2126"] = unitTable["\u03a9"] // U+2126 OHM SIGN reads as U+03A9
}

// prefixes are the SI prefixes from pico to tera (SI Brochure, 9th edition,
// table 7), with "u" as the ASCII spelling of micro.
var prefixes = []struct {
	sym   string
	scale float64
}{
	{"p", 1e-12}, {"n", 1e-9}, {"µ", 1e-6}, {"μ", 1e-6}, {"u", 1e-6}, {"m", 1e-3},
	{"c", 1e-2}, {"d", 1e-1}, {"da", 1e1}, {"h", 1e2}, {"k", 1e3}, {"M", 1e6},
	{"G", 1e9}, {"T", 1e12},
}

// PrefixScale returns the factor of an SI prefix symbol, and whether it is one.
func PrefixScale(p string) (float64, bool) {
	for _, q := range prefixes {
		if q.sym == p {
			return q.scale, true
		}
	}
	return 0, false
}

// lookupSymbol resolves one unit symbol (no powers), whole first, then as
// prefix + symbol.
func lookupSymbol(sym string) (scale float64, dim Dim, angle bool, ok bool) {
	if u, found := unitTable[sym]; found {
		return u.scale, u.dim, u.angle, true
	}
	// Longest prefix first, so that "da" wins over "d".
	best := -1
	for i, p := range prefixes {
		if strings.HasPrefix(sym, p.sym) && len(sym) > len(p.sym) {
			if u, found := unitTable[sym[len(p.sym):]]; found && u.prefixable {
				if best < 0 || len(p.sym) > len(prefixes[best].sym) {
					best = i
				}
			}
		}
	}
	if best < 0 {
		return 0, Dim{}, false, false
	}
	p := prefixes[best]
	u := unitTable[sym[len(p.sym):]]
	return p.scale * u.scale, u.dim, u.angle, true
}

// baseSymbol is sym without its SI prefix, read as lookupSymbol reads it.
func baseSymbol(sym string) string {
	if _, found := unitTable[sym]; found {
		return sym
	}
	best := ""
	for _, p := range prefixes {
		if strings.HasPrefix(sym, p.sym) && len(sym) > len(p.sym) {
			if u, found := unitTable[sym[len(p.sym):]]; found && u.prefixable && len(p.sym) > len(best) {
				best = p.sym
			}
		}
	}
	return sym[len(best):]
}

// Unit is a parsed unit expression such as "kV", "Ω/km" or "Ω·mm²/m".
type Unit struct {
	Text  string  // as written
	Scale float64 // value of 1 unit in coherent SI units
	Dim   Dim
	Angle bool // a plain angle unit (°, deg, rad)
	// Kind is the power kind a single power symbol names: W (active), var
	// (reactive), VA (apparent), with any prefix; PowerNone otherwise.
	Kind PowerKind
	// Plain marks a dimensionless unit that a value keeps when written in
	// it: % and pu.
	Plain bool
	// Offset is the value of 0 in this unit in coherent SI units: 273.15
	// (K) for °C, whose values are absolute temperatures (temperature.go).
	Offset float64
}

// ParseUnit reads a unit expression: symbols joined by "·", "*" or "/",
// each optionally raised to a power ("^2", "^-1", "²", "³"). Every symbol
// after a "/" is in the denominator, so "J/kg·K" is J/(kg·K) and
// "Ω·mm²/m" is Ω·mm²·m⁻¹.
func ParseUnit(text string) (*Unit, error) {
	if u, ok := unitCache.Load(text); ok {
		return u.(*Unit), nil
	}
	u, err := parseUnit(text)
	if err == nil {
		unitCache.Store(text, u)
	}
	return u, err
}

// unitCache holds the units parsed so far: a document writes the same few
// units many times. A *Unit is never changed once parsed.
var unitCache sync.Map

func parseUnit(text string) (*Unit, error) {
	u := &Unit{Text: text, Scale: 1}
	if text == "" {
		return nil, fmt.Errorf("empty unit")
	}
	rs := []rune(text)
	i := 0
	sign := 1
	nsym := 0
	for i <= len(rs) {
		// one symbol
		start := i
		for i < len(rs) && isUnitLetter(rs[i]) {
			i++
		}
		if i == start {
			if i < len(rs) {
				return nil, fmt.Errorf("unexpected %q in unit %q", string(rs[i]), text)
			}
			return nil, fmt.Errorf("unit %q ends with an operator", text)
		}
		sym := string(rs[start:i])
		scale, dim, angle, ok := lookupSymbol(sym)
		if !ok {
			return nil, unknownUnitError(sym)
		}
		if off, has := unitOffsets[sym]; has {
			if start != 0 || i != len(rs) {
				return nil, fmt.Errorf("%s is a point on a temperature scale and cannot be part of a compound unit in %q: a step of 1 %s is 1 K, so write K (e.g. 1/K, W/K)", sym, text, sym)
			}
			u.Offset = off
		}
		pow := 1
		if i < len(rs) {
			switch rs[i] {
			case '^':
				i++
				neg := false
				if i < len(rs) && (rs[i] == '-' || rs[i] == '+') {
					neg = rs[i] == '-'
					i++
				}
				ds := i
				for i < len(rs) && rs[i] >= '0' && rs[i] <= '9' {
					i++
				}
				if ds == i || i-ds > 2 {
					return nil, fmt.Errorf("bad power in unit %q: write a whole number such as m^2", text)
				}
				pow = 0
				for _, c := range rs[ds:i] {
					pow = pow*10 + int(c-'0')
				}
				if neg {
					pow = -pow
				}
			case '²':
				pow = 2
				i++
			case '³':
				pow = 3
				i++
			}
		}
		nsym++
		u.Scale *= math.Pow(scale, float64(sign*pow))
		for k := range u.Dim {
			x := int(u.Dim[k]) + int(dim[k])*sign*pow
			if x > MaxExponent || x < -MaxExponent {
				return nil, fmt.Errorf("unit %q has an exponent beyond ±%d", text, MaxExponent)
			}
			u.Dim[k] = int8(x)
		}
		if angle && nsym == 1 && pow == 1 {
			u.Angle = true
		} else {
			u.Angle = false
		}
		if i >= len(rs) {
			break
		}
		switch rs[i] {
		case '·', '*', '⋅':
		case '/':
			sign = -1
		default:
			return nil, fmt.Errorf("unexpected %q in unit %q", string(rs[i]), text)
		}
		i++
		if i >= len(rs) {
			return nil, fmt.Errorf("unit %q ends with an operator", text)
		}
	}
	if nsym > 1 {
		u.Angle = false
	}
	if nsym == 1 && u.Dim == DimPower {
		u.Kind = powerKindOfUnit(baseSymbol(text))
	}
	if nsym == 1 && (text == "%" || text == "pu") {
		u.Plain = true
	}
	return u, nil
}

func isUnitLetter(r rune) bool {
	return isLetter(r) || r == '°' || r == '%'
}

// unknownUnitError suggests the nearest known symbols.
func unknownUnitError(sym string) error {
	sugg := suggestUnits(sym)
	if len(sugg) == 0 {
		return fmt.Errorf("unknown unit %q", sym)
	}
	q := make([]string, len(sugg))
	for i, s := range sugg {
		q[i] = fmt.Sprintf("%q", s)
	}
	return fmt.Errorf("unknown unit %q (did you mean %s?)", sym, strings.Join(q, " or "))
}

func suggestUnits(sym string) []string {
	type cand struct {
		s string
		d int
	}
	var cs []cand
	low := strings.ToLower(sym)
	for s := range unitTable {
		d := editDistance(low, strings.ToLower(s))
		if strings.HasPrefix(low, strings.ToLower(s)) && len(s) >= 2 {
			d = 1
		}
		// one edit away means nothing for a one-letter symbol (every
		// one-letter unit is one edit from it): only exact case matches then
		if d == 0 || d == 1 && len(low) > 1 || (d <= 2 && len(sym) > 3) {
			cs = append(cs, cand{s, d})
		}
	}
	// a known symbol, with or without a prefix, in the wrong case: "kVAr" is kvar
	for s, u := range unitTable {
		if strings.EqualFold(sym, s) && sym != s {
			cs = append(cs, cand{s, 0})
		}
		for _, p := range prefixes {
			if u.prefixable && strings.EqualFold(sym, p.sym+s) && sym != p.sym+s {
				cs = append(cs, cand{p.sym + s, 0})
			}
		}
	}
	// common misspellings
	switch low {
	case "ohms", "ohm", "omega":
		cs = append(cs, cand{"ohm", 0}, cand{"Ω", 0})
	case "amp", "amps":
		cs = append(cs, cand{"A", 0})
	case "volt", "volts":
		cs = append(cs, cand{"V", 0})
	case "sec", "secs":
		cs = append(cs, cand{"s", 0})
	case "kw":
		cs = append(cs, cand{"kW", 0})
	case "kva":
		cs = append(cs, cand{"kVA", 0})
	case "kv":
		cs = append(cs, cand{"kV", 0})
	case "hz":
		cs = append(cs, cand{"Hz", 0})
	}
	sort.Slice(cs, func(i, j int) bool {
		if cs[i].d != cs[j].d {
			return cs[i].d < cs[j].d
		}
		return cs[i].s < cs[j].s
	})
	var out []string
	seen := map[string]bool{sym: true}
	for _, c := range cs {
		if !seen[c.s] {
			seen[c.s] = true
			out = append(out, c.s)
		}
		if len(out) == 2 {
			break
		}
	}
	return out
}

func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			c := 1
			if ra[i-1] == rb[j-1] {
				c = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+c)
		}
		prev, cur = cur, prev
	}
	return prev[len(rb)]
}

// displayUnit is a default display unit for a dimension.
type displayUnit struct {
	dim Dim
	sym string
}

// defaultUnits lists, for each dimension that has one, the unit a value of
// that dimension is shown in when its line names none. Power is shown in W
// when real and in VA when complex (see DefaultUnit).
var defaultUnits = []displayUnit{
	{DimVoltage, "V"}, {DimCurrent, "A"}, {DimImpedance, "Ω"}, {DimAdmittance, "S"},
	{DimFrequency, "Hz"}, {DimCapacitance, "F"}, {DimInductance, "H"}, {DimTime, "s"},
	{DimLength, "m"}, {DimPower, "W"}, {DimEnergy, "J"}, {DimCharge, "C"},
	{DimFlux, "Wb"}, {DimFluxDensity, "T"}, {DimForce, "N"}, {DimPressure, "Pa"},
	{DimMass, "g"}, {DimTemperature, "K"}, {DimAmount, "mol"}, {DimLuminous, "cd"},
	{DimArea, "m²"}, {DimVolume, "m³"},
}

// CoherentUnit is the coherent SI unit symbol of d when it has a name in the
// default table ("V", "W", "Ω", "kg", ...), else "". Mass is "kg".
func CoherentUnit(d Dim) string {
	if d == DimMass {
		return "kg"
	}
	for _, u := range defaultUnits {
		if u.dim == d {
			return u.sym
		}
	}
	return ""
}

// compoundUnit names d as a power of one named unit ("Ω²", "A⁻¹"), or as
// a quotient or product of a named unit and a base unit ("Ω/m", "V/m"),
// or "" when none fits.
func compoundUnit(d Dim) (sym string, prefixable bool) {
	named := defaultUnits[:len(defaultUnits)-2]
	for _, u := range named {
		if u.dim == DimMass || u.dim == DimTime || u.dim == DimLength {
			continue
		}
		for _, p := range []int{2, 3, -1, -2} {
			if u.dim.Pow(p) == d {
				return u.sym + superscript(p), false
			}
		}
	}
	for _, u := range named {
		if u.dim == DimMass {
			continue
		}
		for _, b := range []struct {
			s string
			d Dim
		}{{"m", DimLength}, {"km", DimLength}, {"s", DimTime}, {"m²", DimArea}} {
			if b.s == "km" {
				continue
			}
			if u.dim.Div(b.d) == d && u.sym != b.s {
				return u.sym + "/" + b.s, true
			}
			if u.dim.Mul(b.d) == d && u.sym != b.s {
				return u.sym + "·" + b.s, true
			}
		}
	}
	return "", false
}
