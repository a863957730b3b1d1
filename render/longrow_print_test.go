package render

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/render/pdf"
	"calcdoc/render/pdf/pdftest"
)

// busLoads is our own scenario: eight feeders of a 400 V switchboard,
// each with its phase voltage (V rms, degrees) and current (A rms,
// degrees).
var busLoads = [8]struct{ v, va, i, ia float64 }{
	{231, -1.5, 12.4, -33}, {229, -2.0, 18.6, -21}, {232, -0.5, 7.3, -48}, {230, -1.0, 25.1, -12},
	{228, -2.5, 9.8, 15}, {231, -1.2, 31.7, -27}, {229, -1.8, 14.2, -36}, {230, -0.8, 21.5, -8},
}

// longRowDoc is a sheet with two long rows: the eight complex powers
// S_k = V_k·I_k* summed by name (a substitution of eight complex terms)
// and summed from the voltages and currents (a formula of eight product
// terms, and a substitution of sixteen values).
func longRowDoc(paper string) string {
	var b strings.Builder
	fmt.Fprintf(&b, "---\ntitle: Switchboard SB-3 load sum\nnumber: CD-LR-1\npaper: %s\n---\n\n```calc\n", paper)
	for k, l := range busLoads {
		fmt.Fprintf(&b, "V_%d = %g V∠%g°\nI_%d = %g A∠%g°\nS_%d = V_%d * conj(I_%d)\n", k+1, l.v, l.va, k+1, l.i, l.ia, k+1, k+1, k+1)
	}
	b.WriteString("S_tot = S_1 + S_2 + S_3 + S_4 + S_5 + S_6 + S_7 + S_8\n")
	b.WriteString("S_sum = V_1 * conj(I_1) + V_2 * conj(I_2) + V_3 * conj(I_3) + V_4 * conj(I_4) + V_5 * conj(I_5) + V_6 * conj(I_6) + V_7 * conj(I_7) + V_8 * conj(I_8)\n")
	b.WriteString("```\n")
	return b.String()
}

// sig4 writes x with four significant figures, as the sheet's default
// digits (LANGUAGE.md section 4): 2.865, 12.40, 231.0.
func sig4(x float64) string { return fixedAs(x, x) }

// fixedAs writes |x| with the decimal places that give the larger part of
// a complex number, ref, four significant figures: both parts of a
// rectangular value share their decimals (2.131 − j0.672).
func fixedAs(x, ref float64) string {
	ref = math.Abs(ref)
	if ref == 0 {
		return "0"
	}
	dec := 3 - int(math.Floor(math.Log10(ref)))
	if dec < 0 {
		dec = 0
	}
	return strconv.FormatFloat(math.Abs(x), 'f', dec, 64)
}

// mathPlain maps the Mathematical Alphanumeric Symbols (U+1D400 to
// U+1D7FF: the italic letters and digits a PDF of MathML may hold) and the
// italic h (U+210E) to ASCII, and drops all white space, so that text
// split by the layout can be matched.
func mathPlain(s string) string {
	var b strings.Builder
	for _, r := range s {
		switch {
		case r == 0x210E:
			r = 'h'
		case r >= 0x1D400 && r <= 0x1D6A3:
			off := (r - 0x1D400) % 52
			if off < 26 {
				r = 'A' + off
			} else {
				r = 'a' + off - 26
			}
		case r >= 0x1D7CE && r <= 0x1D7FF:
			r = '0' + (r-0x1D7CE)%10
		case r == ' ' || r == '\n' || r == '\t' || r == '\u00a0' || r == '\f':
			continue
		}
		b.WriteRune(r)
	}
	return b.String()
}

// TestLongRowsBreakInPrint prints the sheet on A4 and on letter and finds
// every term of the long rows in the PDF's text: a row that ran off the
// page would lose its last terms. The expected numbers are computed here
// with math/cmplx from the inputs: P_k + jQ_k = V_k·conj(I_k) in kW and
// kvar (hand derivation of complex power, S = V·I*, IEEE 1459).
func TestLongRowsBreakInPrint(t *testing.T) {
	pdftest.Chromium(t)
	pdftest.Pdftotext(t)
	for _, paper := range []string{"a4", "letter"} {
		t.Run(paper, func(t *testing.T) {
			src := longRowDoc(paper)
			doc := calcdoc.Parse("longrow.md", []byte(src), kind.Standard())
			if len(doc.Errors) > 0 {
				t.Fatalf("errors: %v", doc.Errors)
			}
			html, err := Sheet(doc, Options{Version: "test"})
			if err != nil {
				t.Fatal(err)
			}
			dir := t.TempDir()
			htmlPath := filepath.Join(dir, "longrow.html")
			if err := os.WriteFile(htmlPath, html, 0o644); err != nil {
				t.Fatal(err)
			}
			pdfPath := filepath.Join(dir, "longrow.pdf")
			if err := pdf.Print(context.Background(), htmlPath, pdfPath); err != nil {
				t.Fatal(err)
			}
			pages, err := pdf.PDFText(context.Background(), pdfPath)
			if err != nil {
				t.Fatal(err)
			}
			all := strings.Join(pages, "\n")
			text := mathPlain(all)

			// the two long rows' lines: their formulas and substitutions
			tot := strings.Index(text, "Stot=")
			sum := strings.Index(text, "Ssum=")
			if tot < 0 || sum < 0 {
				t.Fatalf("the long rows are not in the text:\n%s", all)
			}
			totRows, sumRows := text[tot:sum], text[sum:]
			for k, l := range busLoads {
				v := cmplx.Rect(l.v, l.va*math.Pi/180)
				i := cmplx.Rect(l.i, l.ia*math.Pi/180)
				s := v * cmplx.Conj(i) / 1000 // kVA
				big := math.Max(math.Abs(real(s)), math.Abs(imag(s)))
				p, q := fixedAs(real(s), big), fixedAs(imag(s), big)
				n := strconv.Itoa(k + 1)
				// formula S_tot = S_1 + ... + S_8, then its substitution
				if !strings.Contains(totRows, "S"+n) {
					t.Errorf("S_%s is missing from the S_tot formula", n)
				}
				if !strings.Contains(totRows, p) || !strings.Contains(totRows, q) {
					t.Errorf("the term S_%s = %s + j%s kVA is missing from the S_tot substitution", n, p, q)
				}
				// formula V_k·I_k* of S_sum and its substituted values
				if !strings.Contains(sumRows, "V"+n) || !strings.Contains(sumRows, "I"+n) {
					t.Errorf("V_%s or I_%s is missing from the S_sum formula", n, n)
				}
				if !strings.Contains(sumRows, sig4(l.v)) || !strings.Contains(sumRows, sig4(l.i)) {
					t.Errorf("the values %s V, %s A of term %s are missing from the S_sum substitution", sig4(l.v), sig4(l.i), n)
				}
			}
			// the rows broke: some printed line is a continuation that
			// starts with the operator
			cont := 0
			for _, line := range strings.Split(all, "\n") {
				if f := strings.Fields(line); len(f) > 0 && (f[0] == "+" || strings.HasPrefix(f[0], "+")) {
					cont++
				}
			}
			if cont < 2 {
				t.Errorf("no continuation lines starting with + in the print:\n%s", all)
			}
			if t.Failed() {
				t.Logf("PDF text:\n%s", all)
			}
		})
	}
}
