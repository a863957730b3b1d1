package network

import (
	"encoding/json"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind/calc"
	"calcdoc/calcdoc/kind/phasors"
	"calcdoc/expr"
	"calcdoc/render"
)

// testKinds are the kinds this package's documents use.
var testKinds = calcdoc.NewRegistry(calc.Kind, Kind, phasors.Kind)

func parse(t testing.TB, lines ...string) *calcdoc.Document {
	t.Helper()
	return calcdoc.Parse("net_test.md", []byte(strings.Join(lines, "\n")+"\n"), testKinds)
}

func sheet(t testing.TB, d *calcdoc.Document) string {
	t.Helper()
	out, err := render.Sheet(d, render.Options{Version: "test"})
	if err != nil {
		t.Fatalf("Sheet: %v", err)
	}
	return string(out)
}

func noErrors(t *testing.T, d *calcdoc.Document) {
	t.Helper()
	for _, e := range d.Errors {
		t.Errorf("unexpected error %v", e)
	}
}

// value returns a defined scalar of the document.
func value(t *testing.T, d *calcdoc.Document, name string) *expr.Scalar {
	t.Helper()
	b := d.Env.Lookup(name)
	if b == nil || b.Unavailable {
		t.Fatalf("%s is not defined with a value", name)
	}
	s, ok := b.Value.(*expr.Scalar)
	if !ok {
		t.Fatalf("%s is %T", name, b.Value)
	}
	return s
}

func wantC(t *testing.T, what string, got, want complex128, tol float64) {
	t.Helper()
	if cmplx.Abs(got-want) > tol*(cmplx.Abs(want)+1e-300) || math.IsNaN(real(got)) {
		t.Errorf("%s = %v, want %v", what, got, want)
	}
}

// the divider of the mna package's TestHandDivider, as a document: a
// 100 V ideal source across 30 Ω and 70 Ω in series, then a calc block, a
// check, a phasor diagram and an inline value that use its names.
var divider = []string{
	"# Divider",
	"",
	"```network",
	"ground 0",
	"src: 0 -> A source 100 V   # the supply",
	"r1: A -> B Z 30 Ω",
	"r2: B -> 0 Z 70 Ω",
	"```",
	"",
	"```calc",
	"V_d = V_A - V_B",
	"P_2 = re(S_r2)",
	"check abs(V_B) <= 80 V",
	"```",
	"",
	"```phasors V_A, V_B, I_r1",
	"The divider.",
	"```",
	"",
	"The middle sits at `=abs(V_B)`.",
}

// TestDocumentDivider checks the values a document gets from a network
// block against a hand derivation: I = 100 V / (30 Ω + 70 Ω) = 1 A,
// V_A = 100 V, V_B = 70 Ω · 1 A = 70 V, S_r1 = 30 V · 1 A = 30 VA,
// S_r2 = 70 VA, and the source delivers (V_A − 0)·1 A = 100 VA; a later
// calc block then finds V_A − V_B = 30 V and re(S_r2) = 70 W.
func TestDocumentDivider(t *testing.T) {
	d := parse(t, divider...)
	noErrors(t, d)
	wantC(t, "V_A", value(t, d, "V_A").Z, 100, 1e-14)
	wantC(t, "V_B", value(t, d, "V_B").Z, 70, 1e-14)
	for name, want := range map[string]complex128{"I_src": 1, "I_r1": 1, "I_r2": 1} {
		s := value(t, d, name)
		wantC(t, name, s.Z, want, 1e-14)
		if s.Dim != expr.DimCurrent {
			t.Errorf("%s has dimension %v", name, s.Dim)
		}
	}
	for name, want := range map[string]complex128{"S_src": 100, "S_r1": 30, "S_r2": 70} {
		s := value(t, d, name)
		wantC(t, name, s.Z, want, 1e-14)
		if s.Dim != expr.DimPower || s.Kind != expr.PowerApparent {
			t.Errorf("%s: dimension %v kind %v, want an apparent power", name, s.Dim, s.Kind)
		}
	}
	wantC(t, "V_d", value(t, d, "V_d").Z, 30, 1e-14)
	wantC(t, "P_2", value(t, d, "P_2").Z, 70, 1e-14)
	if len(d.Checks) != 1 || d.Checks[0].Result == nil || !d.Checks[0].Result.Pass {
		t.Errorf("check: %+v", d.Checks)
	}
	// the values JSON: V in V, I in A, S in VA of the apparent kind
	var vj calcdoc.ValuesJSON
	if err := json.Unmarshal(d.MarshalValues(), &vj); err != nil {
		t.Fatal(err)
	}
	units := map[string][2]any{}
	for _, v := range vj.Values {
		units[v.Name] = [2]any{v.Unit, v.Kind}
	}
	for name, want := range map[string][2]any{"V_A": {"V", nil}, "I_r1": {"A", nil}, "S_r1": {"VA", "apparent"}} {
		if units[name] != want {
			t.Errorf("values JSON %s: unit, kind %v, want %v", name, units[name], want)
		}
	}
	// the inline value `=abs(V_B)`: 70 V (hand derivation above)
	if len(d.Inline) != 1 || d.Inline[0].Err != nil {
		t.Fatalf("inline values: %+v", d.Inline)
	}
	if s, ok := d.Inline[0].Value.(*expr.Scalar); !ok || cmplx.Abs(s.Z-70) > 1e-12 {
		t.Errorf("inline abs(V_B) = %v, want 70 V", d.Inline[0].Value)
	}
	page := sheet(t, d)
	if !strings.Contains(page, "The middle sits at") || !strings.Contains(page, "<svg") {
		t.Errorf("the sheet lacks the inline value's paragraph or the phasor diagram")
	}
}

// TestDocumentNumPy solves a generated network (every element kind, a
// tag) through the document and compares its node voltages, branch
// currents and powers with the independent NumPy modified nodal analysis
// of testdata/refgen/gen_network.py (testdata/network/generated.json).
func TestDocumentNumPy(t *testing.T) {
	raw, err := os.ReadFile(filepath.Join("..", "..", "..", "testdata", "network", "generated.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Networks []struct {
			Nodes int                   `json:"nodes"`
			Tag   string                `json:"tag"`
			Text  string                `json:"text"`
			Kinds []string              `json:"kinds"`
			RV    map[string][2]float64 `json:"V"`
			RI    map[string][2]float64 `json:"I"`
			RS    map[string][2]float64 `json:"S"`
		} `json:"networks"`
	}
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	done := 0
	for k, nw := range ref.Networks {
		if nw.Tag == "" || len(nw.Kinds) < 8 || nw.Nodes > 40 {
			continue
		}
		done++
		d := parse(t, "```network "+nw.Tag, nw.Text, "```")
		noErrors(t, d)
		suffix := "_" + nw.Tag
		check := func(prefix string, m map[string][2]float64) {
			big := 0.0
			for _, p := range m {
				big = math.Max(big, math.Hypot(p[0], p[1]))
			}
			for name, p := range m {
				got := value(t, d, prefix+name+suffix).Z
				if cmplx.Abs(got-complex(p[0], p[1])) > 1e-9*big {
					t.Errorf("network %d: %s%s%s = %v, NumPy %v", k, prefix, name, suffix, got, complex(p[0], p[1]))
				}
			}
		}
		check("V_", nw.RV)
		check("I_", nw.RI)
		check("S_", nw.RS)
		page := sheet(t, d)
		// a network of more than InlineSystemLimit unknowns lists A in the appendix
		res := d.Blocks[0].Result.(*Result)
		n := len(res.Network.Unknowns)
		if appendix := strings.Contains(page, "the non-zero entries of A and b"); appendix != (n > InlineSystemLimit) {
			t.Errorf("network %d (%d unknowns): matrix in the appendix %v", k, n, appendix)
		}
		if n > InlineSystemLimit && strings.Count(page, "<tr><td>") < res.Network.A.NNZ() {
			t.Errorf("network %d: fewer rows than the %d non-zero entries of A", k, res.Network.A.NNZ())
		}
	}
	if done < 2 {
		t.Fatalf("%d networks compared", done)
	}
}

// TestSheetStructure checks the sheet of the divider: the branch table,
// one KCL row per node (in the trade's form), the source's equation, the
// matrix, the solution rows the verifier compares, every branch's current
// and power, and the balance.
func TestSheetStructure(t *testing.T) {
	d := parse(t, divider...)
	page := sheet(t, d)
	if again := sheet(t, parse(t, divider...)); again != page {
		t.Errorf("two builds of the same document differ")
	}
	for _, want := range []string{
		"<table class=\"data branches\"",
		"KCL at node A", "KCL at node B",
		// (V_A − V_B)/Z_r1 leaves A; at B it is written (V_B − V_A)/Z_r1
		"<mfrac><mrow><msub><mi>V</mi><mi>A</mi></msub><mo>−</mo><msub><mi>V</mi><mi>B</mi></msub></mrow>",
		"the source src: raises A above 0",
		"<table class=\"data system\"",
		"data-value=\"V_A\" data-line=\"5\"", "data-value=\"V_B\" data-line=\"6\"",
		"data-value=\"I_r1\"", "data-value=\"S_r2\"", "data-value=\"S_src\"",
		"<table class=\"data balance\"", "delivered by the sources", "mismatch, delivered − taken",
		"Linear, solved directly.", "Condition number estimate",
	} {
		if !strings.Contains(page, want) {
			t.Errorf("the sheet lacks %q", want)
		}
	}
	kcl := regexp.MustCompile(`<div class="desc">KCL at node [^<]*</div>`).FindAllString(page, -1)
	if len(kcl) != 2 {
		t.Errorf("%d KCL rows, want 2 (nodes A and B; 0 is the ground)", len(kcl))
	}
	// KCL at B: (V_B − V_A)/Z_r1 + V_B/Z_r2 = 0 (hand derivation: the
	// currents leaving B through r1 and r2)
	rowB := page[strings.Index(page, "KCL at node B")-1500 : strings.Index(page, "KCL at node B")]
	rowB = rowB[strings.LastIndex(rowB, "<div class=\"row eq\">"):]
	wantB := "<mfrac><mrow><msub><mi>V</mi><mi>B</mi></msub><mo>−</mo><msub><mi>V</mi><mi>A</mi></msub></mrow><mrow><msub><mi>Z</mi><mi>r1</mi></msub></mrow></mfrac><mo>+</mo><mfrac><mrow><msub><mi>V</mi><mi>B</mi></msub></mrow><mrow><msub><mi>Z</mi><mi>r2</mi></msub></mrow></mfrac><mo>=</mo><mn>0</mn>"
	if !strings.Contains(rowB, wantB) {
		t.Errorf("KCL at B is\n%s\nwant\n%s", rowB, wantB)
	}
	// the balance: 100 VA delivered, 100 VA taken by the two Z branches
	if !strings.Contains(page, "taken by the Z branches (impedance)</td><td>2</td>") {
		t.Errorf("the balance lacks the two Z branches")
	}
}

// TestErrorsThroughDocument: each error of a network block reaches the
// document once, at its line and column in the file, and the names the
// block would define are unavailable below it (a later line that uses one
// is not evaluated, and is no new error).
func TestErrorsThroughDocument(t *testing.T) {
	head := []string{"# E", "", "```network", "ground 0", "g: 0 -> A source 10 V, Z 1 Ω", "r: A -> 0 Z 1 Ω"}
	tail := []string{"```", "", "```calc", "x = V_A * 2", "```"}
	for _, c := range []struct {
		name      string
		lines     []string
		line, col int
		msg       string
	}{
		// line numbers: the fence is line 3, "ground 0" line 4
		{"one branch", []string{"x: A -> B Z 1 Ω"}, 7, 9, "node B is connected by one branch only (x)"},
		{"source loop", []string{"s1: 0 -> A source 10 V", "s2: 0 -> A source 10 V"}, 8, 1, "form a loop"},
		{"current cut set", []string{"j1: A -> B current 1 A", "j2: B -> A current 2 A"}, 7, 10, "a cut set of current sources"},
		{"duplicate branch", []string{"r: A -> 0 Z 2 Ω"}, 7, 1, "the branch name r is used twice (first at line 6)"},
		{"non-linear", []string{"k: A -> 0 current 0.1 S * V_A * V_A / (1 V)"}, 7, 19, "not linear in V_A"},
		{"no ground", []string{"q: C -> D Z 1 Ω", "q2: D -> C Z 1 Ω"}, 0, 0, "has no ground"},
	} {
		lines := append(append(append([]string{}, head...), c.lines...), tail...)
		d := parse(t, lines...)
		if len(d.Errors) != 1 {
			t.Errorf("%s: %d errors, want 1: %v", c.name, len(d.Errors), d.Errors)
			continue
		}
		e := d.Errors[0]
		if !strings.Contains(e.Msg, c.msg) || (c.line > 0 && (e.Pos.Line() != c.line || e.Pos.Col() != c.col)) {
			t.Errorf("%s: error at %d:%d %q, want %d:%d %q", c.name, e.Pos.Line(), e.Pos.Col(), e.Msg, c.line, c.col, c.msg)
		}
		if b := d.Env.Lookup("x"); b == nil || !b.Unavailable {
			t.Errorf("%s: x = V_A * 2 is not unavailable", c.name)
		}
		page := sheet(t, d)
		if strings.Count(page, "role=\"alert\"") != 1 {
			t.Errorf("%s: the error is shown %d times in the sheet, want once", c.name, strings.Count(page, "role=\"alert\""))
		}
		// in place: under the row of its line in the branch table
		row := strings.Index(page, "<tr id=\"L"+itoa(e.Pos.Line())+"\"")
		next := len(page)
		if k := strings.Index(page[row+1:], "<tr id="); k >= 0 {
			next = row + 1 + k
		}
		if alert := strings.Index(page, "role=\"alert\""); c.line > 0 && (row < 0 || alert < row || alert > next) {
			t.Errorf("%s: the error is not under the row of line %d", c.name, e.Pos.Line())
		}
	}
	// a name that already exists: named at the node that would define it
	d := parse(t, append([]string{"```calc", "V_A = 1 V", "```"}, append(head[2:], tail[:1]...)...)...)
	if len(d.Errors) != 1 || !strings.Contains(d.Errors[0].Msg, "V_A is already defined") {
		t.Errorf("name exists: %v", d.Errors)
	}
	// the tag moves the block's names out of the way
	d = parse(t, append([]string{"```calc", "V_A = 1 V", "```", "```network b"}, append(head[3:], tail[:1]...)...)...)
	noErrors(t, d)
	wantC(t, "V_A_b", value(t, d, "V_A_b").Z, 5, 1e-14) // hand derivation: 10 V over 1 Ω + 1 Ω
}

func itoa(n int) string { return strconv.Itoa(n) }

// TestSubstitution: an element written with names shows, under its
// formula, the formula with each name replaced by its value (as a calc
// row's substitution) and, in the value column, the value: hand
// derivation, 0.25 Ω/km · 4 km = 1 Ω.
func TestSubstitution(t *testing.T) {
	d := parse(t, "```calc", "z_l = 0.25 Ω/km", "```", "", "```network", "ground 0", "g: 0 -> A source 10 V, Z 1 Ω", "r: A -> 0 Z z_l * 4 km", "```")
	noErrors(t, d)
	page := sheet(t, d)
	row := page[strings.Index(page, "<tr id=\"L8\""):]
	row = row[:strings.Index(row, "</tr>")]
	if !strings.Contains(row, "<br>= ") || !strings.Contains(row, "<mn>0.2500</mn>") || !strings.Contains(row, "<mn>1.000</mn>") {
		t.Errorf("the row of r lacks the substitution or its value:\n%s", row)
	}
	wantC(t, "V_A", value(t, d, "V_A").Z, 5, 1e-14) // 10 V across 1 Ω + 1 Ω
}
