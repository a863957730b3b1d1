package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"
)

// csvDoc is the reference document of the CSV tests; its sweeps start at
// csvSweeps (the lines of their opening fences).
var (
	csvDoc    = filepath.Join("..", "..", "testdata", "refgen", "sweep_csv.md")
	csvSweeps = []int{27, 34, 41}
)

// valuesOut is the values JSON as the tests read it back.
type valuesOut struct {
	Values []struct {
		Name   string `json:"name"`
		Line   int    `json:"line"`
		Re     any    `json:"re"`
		Im     any    `json:"im"`
		Unit   any    `json:"unit"`
		Shown  string `json:"shown"`
		Sense  any    `json:"sense"`
		Export any    `json:"export"`
	} `json:"values"`
	Sweeps []struct {
		Line     int    `json:"line"`
		Variable string `json:"variable"`
		Unit     string `json:"unit"`
		Columns  []struct {
			Text string `json:"text"`
			Line int    `json:"line"`
			Unit string `json:"unit"`
		} `json:"columns"`
		Points []struct {
			X      float64 `json:"x"`
			Values []struct {
				Re     *float64 `json:"re"`
				Im     *float64 `json:"im"`
				Sense  *string  `json:"sense"`
				Export *bool    `json:"export"`
			} `json:"values"`
		} `json:"points"`
	} `json:"sweeps"`
}

func readValues(t *testing.T, path string) (valuesOut, string) {
	t.Helper()
	st, out, errs := runCLI("values", path)
	if st != exitOK {
		t.Fatalf("values %s: exit %d: %s", path, st, errs)
	}
	var v valuesOut
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatalf("values JSON: %v", err)
	}
	return v, out
}

// readCSV runs calcdoc with args and reads its output with encoding/csv
// (RFC 4180); it also checks that the bytes are UTF-8 without a
// byte-order mark and that every record ends in CRLF.
func readCSV(t *testing.T, args ...string) ([][]string, string) {
	t.Helper()
	st, out, errs := runCLI(args...)
	if st != exitOK {
		t.Fatalf("%v: exit %d: %s", args, st, errs)
	}
	if !utf8.ValidString(out) || strings.HasPrefix(out, "\uFEFF") {
		t.Errorf("%v: not UTF-8 without a byte-order mark", args)
	}
	if strings.Count(out, "\n") != strings.Count(out, "\r\n") || !strings.HasSuffix(out, "\r\n") {
		t.Errorf("%v: records do not all end in CRLF", args)
	}
	r := csv.NewReader(strings.NewReader(out)) // every record as long as the header
	rows, err := r.ReadAll()
	if err != nil {
		t.Fatalf("%v: encoding/csv cannot read the output: %v\n%s", args, err, out)
	}
	return rows, out
}

// num reads a CSV number field; ok is false for an empty field.
func num(t *testing.T, f string) (x float64, ok bool) {
	t.Helper()
	if f == "" {
		return 0, false
	}
	x, err := strconv.ParseFloat(f, 64)
	if err != nil {
		t.Fatalf("field %q is not a number: %v", f, err)
	}
	return x, true
}

// TestValuesCSV reads `values --csv` with encoding/csv and compares every
// field with the values JSON: numbers exactly (full precision round-trips),
// a matrix or vector entry by entry under the name M(i,j) or v(i).
func TestValuesCSV(t *testing.T) {
	js, _ := readValues(t, csvDoc)
	rows, raw := readCSV(t, "values", "--csv", csvDoc)
	if strings.Join(rows[0], ",") != "name,line,re,im,unit,shown" {
		t.Fatalf("header %q", rows[0])
	}
	// the fields that hold a comma are quoted (RFC 4180)
	for _, q := range []string{`"0.8349 lagging, export"`, `"Z_m(1,2)"`} {
		if !strings.Contains(raw, q) {
			t.Errorf("the CSV lacks the quoted field %s", q)
		}
	}
	byName := map[string][]string{}
	for _, r := range rows[1:] {
		byName[r[0]] = r
	}
	n := 0
	for _, v := range js.Values {
		line := strconv.Itoa(v.Line)
		type entry struct {
			name         string
			re, im, unit any
		}
		var es []entry
		switch re := v.Re.(type) {
		case []any: // rows of a matrix
			im, un := v.Im.([]any), v.Unit.([]any)
			for i := range re {
				for j := range re[i].([]any) {
					name := fmt.Sprintf("%s(%d,%d)", v.Name, i+1, j+1)
					if len(re[i].([]any)) == 1 {
						name = fmt.Sprintf("%s(%d)", v.Name, i+1)
					}
					es = append(es, entry{name, re[i].([]any)[j], im[i].([]any)[j], un[i].([]any)[j]})
				}
			}
		default:
			es = append(es, entry{v.Name, v.Re, v.Im, v.Unit})
		}
		for _, e := range es {
			r := byName[e.name]
			if r == nil {
				t.Errorf("%s: no CSV row", e.name)
				continue
			}
			re, _ := num(t, r[2])
			im, _ := num(t, r[3])
			if r[1] != line || re != e.re.(float64) || im != e.im.(float64) || r[4] != e.unit.(string) {
				t.Errorf("%s: CSV %q, JSON line %s re %v im %v unit %v", e.name, r, line, e.re, e.im, e.unit)
			}
			if len(es) == 1 && r[5] != v.Shown {
				t.Errorf("%s: shown %q, JSON %q", e.name, r[5], v.Shown)
			}
			n++
		}
	}
	if n != len(rows)-1 || n != 14 {
		t.Errorf("%d values compared, %d CSV rows (the document has 14 scalars and entries)", n, len(rows)-1)
	}
	// the power factor sent out (S_g = -(455 + j300) kVA): |P|/|S| =
	// 455/√(455² + 300²) (IEEE 1459 PF = P/S, hand derivation), lagging as
	// P·Q > 0, export as P < 0
	pf := byName["pf_g"]
	want := 455 / math.Hypot(455, 300)
	if x, _ := num(t, pf[2]); math.Abs(x-want) > 1e-15 || pf[5] != "0.8349 lagging, export" {
		t.Errorf("pf_g: %q, want %.17g shown 0.8349 lagging, export", pf, want)
	}
	for _, v := range js.Values {
		if v.Name == "pf_g" && (v.Sense != "lagging" || v.Export != true) {
			t.Errorf("pf_g in the JSON: sense %v export %v, want lagging, true", v.Sense, v.Export)
		}
		if v.Name == "R_1" && (v.Sense != nil || v.Export != nil) {
			t.Errorf("R_1 is no power factor, but the JSON gives it a sense")
		}
	}
}

// TestSweepCSV reads each sweep's CSV with encoding/csv and compares every
// number with the values JSON (exactly) and the series RLC sweep and the
// capacitor-step sweep with the handbook formulas, computed with Go's
// math/cmplx: Z = R + jωL + 1/(jωC) with ω = 2πf, and PF = |P|/|S| (IEEE
// Std 1459-2010) with the four-quadrant sense.
func TestSweepCSV(t *testing.T) {
	js, _ := readValues(t, csvDoc)
	if len(js.Sweeps) != len(csvSweeps) {
		t.Fatalf("%d sweeps in the JSON, want %d", len(js.Sweeps), len(csvSweeps))
	}
	wantHeads := map[int]string{
		27: "f [Hz],re(Z_in) [Ω],im(Z_in) [Ω],re(|Z_in|) [Ω],im(|Z_in|) [Ω],re(arg(Z_in)) [rad],im(arg(Z_in)) [rad],re(max(|Z_in|, 100 Ω)) [Ω],im(max(|Z_in|, 100 Ω)) [Ω]",
		34: "n,re(Q_n) [var],im(Q_n) [var],re(pf_n),im(pf_n),sense(pf_n),re(pf_x),im(pf_x),sense(pf_x),re(k),im(k)",
		41: "theta [rad],re(V_t) [V],im(V_t) [V]",
	}
	wantN := map[int]int{27: 200, 34: 9, 41: 7}
	for k, sw := range js.Sweeps {
		if sw.Line != csvSweeps[k] {
			t.Fatalf("sweep %d starts at line %d, want %d", k+1, sw.Line, csvSweeps[k])
		}
		rows, _ := readCSV(t, "values", "--csv", "--sweep", strconv.Itoa(sw.Line), csvDoc)
		if got := strings.Join(rows[0], ","); got != wantHeads[sw.Line] {
			t.Errorf("line %d: header\n %s\nwant\n %s", sw.Line, got, wantHeads[sw.Line])
		}
		if len(sw.Points) != wantN[sw.Line] || len(rows)-1 != len(sw.Points) {
			t.Errorf("line %d: %d JSON points and %d CSV rows, want %d (every point)", sw.Line, len(sw.Points), len(rows)-1, wantN[sw.Line])
			continue
		}
		for i, p := range sw.Points {
			r := rows[i+1]
			if x, _ := num(t, r[0]); x != p.X {
				t.Errorf("line %d point %d: x %s, JSON %v", sw.Line, i+1, r[0], p.X)
			}
			f := 1
			for c, v := range p.Values {
				re, okr := num(t, r[f])
				im, oki := num(t, r[f+1])
				f += 2
				switch {
				case v.Re == nil || v.Im == nil:
					if okr || oki || v.Re != v.Im {
						t.Errorf("line %d point %d %s: CSV %q %q, JSON re %v im %v", sw.Line, i+1, sw.Columns[c].Text, r[f-2], r[f-1], v.Re, v.Im)
					}
				case !okr || !oki || re != *v.Re || im != *v.Im:
					t.Errorf("line %d point %d %s: CSV %q %q, JSON %v %v", sw.Line, i+1, sw.Columns[c].Text, r[f-2], r[f-1], *v.Re, *v.Im)
				}
				if f < len(r) && strings.HasPrefix(rows[0][f], "sense(") {
					words := ""
					if v.Sense != nil {
						words = *v.Sense
					}
					if v.Export != nil && *v.Export {
						words = strings.TrimPrefix(words+", export", ", ")
					}
					if r[f] != words {
						t.Errorf("line %d point %d: sense %q, JSON %q", sw.Line, i+1, r[f], words)
					}
					f++
				}
			}
			if f != len(r) {
				t.Errorf("line %d point %d: %d fields read of %d", sw.Line, i+1, f, len(r))
			}
		}
	}

	// the handbook formulas, from the CSV's own numbers
	rlc, _ := readCSV(t, "values", "--csv", "--sweep", "27", csvDoc)
	for _, r := range rlc[1:] {
		f, _ := num(t, r[0])
		w := 2 * math.Pi * f
		z := complex(12, w*35e-3) + 1/complex(0, w*2.2e-6)
		re, _ := num(t, r[1])
		im, _ := num(t, r[2])
		mag, _ := num(t, r[3])
		ang, _ := num(t, r[5])
		got := complex(re, im)
		if cmplx.Abs(got-z) > 1e-12*cmplx.Abs(z) || math.Abs(mag-cmplx.Abs(z)) > 1e-12*cmplx.Abs(z) || math.Abs(ang-cmplx.Phase(z)) > 1e-12 {
			t.Errorf("f = %s: Z %v |Z| %v arg %v, handbook %v %v %v", r[0], got, mag, ang, z, cmplx.Abs(z), cmplx.Phase(z))
		}
	}
	steps, _ := readCSV(t, "values", "--csv", "--sweep", "34", csvDoc)
	for _, r := range steps[1:] {
		n, _ := num(t, r[0])
		q := 300e3 - n*50e3
		pf, _ := num(t, r[3])
		want := 455e3 / math.Hypot(455e3, q)
		word := map[bool]string{true: "lagging", false: "leading"}[q > 0]
		if q == 0 {
			word = ""
		}
		if math.Abs(pf-want) > 1e-15 || r[5] != word || r[8] != strings.TrimPrefix(word+", export", ", ") {
			t.Errorf("n = %s: pf %s %q / %q, want %.17g %q (IEEE 1459, four quadrants)", r[0], r[3], r[5], r[8], want, word)
		}
		// k = 1/(n − 4) has no value at n = 4: empty fields
		if (n == 4) != (r[9] == "" && r[10] == "") {
			t.Errorf("n = %s: k is %q %q", r[0], r[9], r[10])
		}
	}
}

// TestSweepCSVErrors: a --sweep line where no sweep starts is a usage
// error naming the lines where sweeps do start; --sweep needs --csv.
func TestSweepCSVErrors(t *testing.T) {
	st, out, errs := runCLI("values", "--csv", "--sweep", "28", csvDoc)
	if st != exitUsage || out != "" || !strings.Contains(errs, "no sweep starts at line 28") || !strings.Contains(errs, "27, 34, 41") {
		t.Errorf("--sweep 28: exit %d, stdout %q, stderr %q", st, out, errs)
	}
	st, _, errs = runCLI("values", "--sweep", "27", csvDoc)
	if st != exitUsage || !strings.Contains(errs, "--csv") {
		t.Errorf("--sweep without --csv: exit %d, stderr %q", st, errs)
	}
	dir := t.TempDir()
	p := write(t, dir, "nosweep.md", okDoc)
	st, _, errs = runCLI("values", "--csv", "--sweep", "1", p)
	if st != exitUsage || !strings.Contains(errs, "has no sweep") {
		t.Errorf("a document without sweeps: exit %d, stderr %q", st, errs)
	}
	st, _, _ = runCLI("values", "--csv", "--sweep", "x", p)
	if st != exitUsage {
		t.Errorf("--sweep x: exit %d, want %d", st, exitUsage)
	}
	// a document with an error still prints its CSV, its errors on stderr
	bad := write(t, dir, "bad.md", errDoc)
	st, out, errs = runCLI("values", "--csv", bad)
	if st != exitError || !strings.HasPrefix(out, "name,line,re,im,unit,shown\r\n") || !strings.Contains(errs, "bad.md:2:") {
		t.Errorf("document with an error: exit %d, stdout %q, stderr %q", st, out, errs)
	}
}

// python returns the Python with NumPy: Debian's /usr/bin/python3 first
// (python3-numpy installs there), then python3 on the PATH; "" when
// neither imports numpy.
func python() string {
	for _, p := range []string{"/usr/bin/python3", "python3"} {
		if exec.Command(p, "-c", "import numpy").Run() == nil {
			return p
		}
	}
	return ""
}

// TestSweepCSVAgainstNumPy writes the values JSON and every sweep's CSV of
// the reference document and runs testdata/refgen/check_sweep_csv.py on
// them: Python's csv module reads the CSV, every number must equal the
// JSON's, and NumPy recomputes every column (and the power factor's sense
// from IEEE 1459's PF = P/S and the four-quadrant convention). Without
// Python and NumPy the test skips, unless CALCDOC_REQUIRE_BROWSER=1 (as
// in CI, which installs python3-numpy).
func TestSweepCSVAgainstNumPy(t *testing.T) {
	py := python()
	if py == "" {
		if os.Getenv("CALCDOC_REQUIRE_BROWSER") == "1" {
			t.Fatal("python3 with numpy is needed (apt-get install python3-numpy) and CALCDOC_REQUIRE_BROWSER=1")
		}
		t.Skip("no python3 with numpy (apt-get install python3-numpy)")
	}
	dir := t.TempDir()
	_, js := readValues(t, csvDoc)
	if err := os.WriteFile(filepath.Join(dir, "values.json"), []byte(js), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, l := range csvSweeps {
		_, raw := readCSV(t, "values", "--csv", "--sweep", strconv.Itoa(l), csvDoc)
		if err := os.WriteFile(filepath.Join(dir, fmt.Sprintf("sweep-%d.csv", l)), []byte(raw), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	cmd := exec.Command(py, filepath.Join("..", "..", "testdata", "refgen", "check_sweep_csv.py"), dir)
	var out bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &out
	if err := cmd.Run(); err != nil {
		t.Fatalf("check_sweep_csv.py: %v\n%s", err, out.String())
	}
	if !strings.Contains(out.String(), "agree") {
		t.Fatalf("check_sweep_csv.py said: %s", out.String())
	}
	t.Log(strings.TrimSpace(out.String()))
}
