package solve

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"sync"

	"calcdoc/calcdoc"
	numeric "calcdoc/calcdoc/kind/solve/numeric"
	"calcdoc/expr"
	"calcdoc/expr/linalg/sparse"
	"calcdoc/render/markup"
)

// InlineSystemLimit is the largest number of rows or columns of a linear
// set's matrix drawn in place; a larger matrix, and a longer Newton
// history, go to the appendix at the end of the sheet.
const InlineSystemLimit = 12

// FullTableLimit is the largest number of rows or columns of a linear
// set's matrix that the appendix draws as a whole table, zeros included;
// a larger matrix is listed by its non-zero entries, row by row, and b by
// its non-zero entries (as a network block lists its matrix), so that the
// appendix grows with the entries of the set and not with its square.
const FullTableLimit = 40

// renderSolve draws a solve block: the unknowns, each equation as
// written, how the set was solved, the matrix of a linear set, the
// solution and a table that evaluates both sides of every equation at it.
func renderSolve(w *markup.Writer, b *calcdoc.Block) {
	set, _ := b.Result.(*SolveSet)
	if set == nil {
		set = &SolveSet{}
	}
	shown := map[*expr.Error]bool{}
	w.Printf("<div class=\"block solve\" id=\"B%d\">\n", b.Pos.Line())
	w.WriteString("<div class=\"bhead\">equation set</div>\n")

	// the unknowns
	line := b.InfoPos.Line()
	w.Printf("<div class=\"row unk\" id=\"L%d\"><div class=\"ln\">%d</div><div><div class=\"f\">", line, line)
	if len(set.Unknowns) == 0 {
		w.WriteString("<span class=\"kindtag\">solve</span> <code>" + markup.Esc(b.Arg) + "</code>")
	} else {
		w.WriteString("<span class=\"kindtag\">solve for</span> ")
		for i, u := range set.Unknowns {
			if i > 0 {
				w.WriteString("; ")
			}
			w.WriteString(unknownHTML(w, u))
		}
	}
	w.WriteString("</div>")
	for _, e := range set.HeaderErrs {
		w.ErrorRow(e)
		shown[e] = true
	}
	w.Printf("</div><div class=\"desc\">%s</div></div>\n", markup.Esc(countText(set)))

	// the equations, as written
	for _, l := range set.Lines {
		ln := l.Stmt.Pos().Line()
		switch s := l.Stmt.(type) {
		case *expr.Note:
			w.Printf("<div class=\"row note\" id=\"L%d\"><div class=\"ln\">%d</div><div class=\"txt\">%s</div></div>\n", ln, ln, markup.Esc(s.Text))
			continue
		case *expr.Equation:
			w.Printf("<div class=\"row eq\" id=\"L%d\"><div class=\"ln\">%d</div><div>", ln, ln)
			label := ""
			if s.Label != nil {
				label = "<b class=\"eqlabel\">" + markup.Esc(s.Label.Name) + ":</b> "
			}
			tail := ""
			if l.Equation != nil && l.Equation.RealValued {
				tail = " <span class=\"tol\">(real-valued: counts as one real equation)</span>"
			}
			f := w.ExprMLFor(false, nil)
			if f.Splits(s.LHS) || f.Splits(s.RHS) {
				// a long equation breaks like a long formula row: before a
				// top-level + or − of either side, and before its =
				p := w.StartPieces("f", label)
				f.WritePieces(p, s.LHS)
				p.Cut(markup.Term)
				w.WriteString("<mo>=</mo>")
				f.WritePieces(p, s.RHS)
				p.End(tail)
			} else {
				w.WriteString("<div class=\"f\">" + label)
				w.WriteString(markup.Math(f.Node(s.LHS, false) + "<mo>=</mo>" + f.Node(s.RHS, false)))
				w.WriteString(tail + "</div>")
			}
		default:
			w.Printf("<div class=\"row eq\" id=\"L%d\"><div class=\"ln\">%d</div><div><div class=\"f\"><code>%s</code></div>", ln, ln, markup.Esc(l.Text))
		}
		for _, e := range l.Errs {
			w.ErrorRow(e)
			shown[e] = true
		}
		w.Printf("</div><div class=\"desc\">%s</div></div>\n", markup.Esc(l.Stmt.Desc()))
	}

	// what stopped the set, in place
	var rest []*expr.Error
	for _, e := range set.SetErrs {
		rest = append(rest, e)
		shown[e] = true
	}
	for _, e := range b.Errors {
		if !shown[e] {
			rest = append(rest, e)
		}
	}
	if len(rest) > 0 || set.Unavailable != nil || !set.Solved {
		partOpen(w)
		for _, e := range rest {
			w.ErrorRow(e)
		}
		if set.Unavailable != nil {
			w.UnavailableRow(set.Unavailable)
		}
		if !set.Solved && len(set.Unknowns) > 0 {
			w.Printf("<p>Not solved: %s %s no value below this block.</p>", namesHTML(set.Unknowns), hasHave(len(set.Unknowns)))
		}
		partClose(w)
	}
	if set.Solved {
		solvedParts(w, b, set)
	}
	w.WriteString("</div>\n")
}

// partOpen starts a part of the block that has no source line of its own
// (the method, the matrix, the verification): the full width of the block.
func partOpen(w *markup.Writer) { w.WriteString("<div class=\"part\" style=\"" + partStyle + "\">") }

// partStyle is the inline style of a block's parts (the sheet's style
// sheet has no rule for them); tables keep each value on one line.
const partStyle = "padding: 2pt 0 2pt 11mm; border-bottom: var(--thin);"

func partClose(w *markup.Writer) { w.WriteString("</div>\n") }

func hasHave(n int) string {
	if n == 1 {
		return "has"
	}
	return "have"
}

func namesHTML(us []*Unknown) string {
	var s []string
	for _, u := range us {
		s = append(s, markup.NameHTML(u.Name))
	}
	switch len(s) {
	case 1:
		return s[0]
	case 2:
		return s[0] + " and " + s[1]
	}
	return strings.Join(s[:len(s)-1], ", ") + " and " + s[len(s)-1]
}

// unknownHTML writes one unknown of the list: its name, its unit, whether
// it is real or complex, and its starting value.
func unknownHTML(w *markup.Writer, u *Unknown) string {
	var sb strings.Builder
	sb.WriteString(markup.Math(markup.NameML(u.Name)))
	if u.HasUnit() {
		sb.WriteString(" in " + markup.Esc(markup.UnitText(u.Display.Unit.Text)))
	}
	if u.Real {
		sb.WriteString(", real")
	} else {
		sb.WriteString(", complex")
	}
	if u.Near != nil {
		sb.WriteString(", starting from " + markup.Math(markup.ValueML(u.Near, u.Display, w.Digits(), false)))
	} else if u.NearText != "" {
		sb.WriteString(", starting from <code>" + markup.Esc(u.NearText) + "</code>")
	}
	return sb.String()
}

// countText is the count of real equations and real unknowns.
func countText(set *SolveSet) string {
	if set.RealUnknowns == 0 {
		return ""
	}
	return fmt.Sprintf("%d real equation%s for %d real unknown%s (a complex equation or unknown counts as two)",
		set.RealEquations, markup.Plural(set.RealEquations), set.RealUnknowns, markup.Plural(set.RealUnknowns))
}

// sci writes a small positive figure such as a residual: "3.2e-14", "0".
func sci(x float64) string {
	switch {
	case x == 0:
		return "0"
	case math.IsInf(x, 1):
		return "∞"
	case math.IsNaN(x):
		return "—"
	}
	return sciExponent().Replace(fmt.Sprintf("%.3g", x))
}

// sciExponent shortens the exponent of a figure: "e-05" to "e-5",
// "e+10" to "e10". Made once, on first use (a replacer of several strings
// builds tables: made on each call it cost more than the figure).
var sciExponent = sync.OnceValue(func() *strings.Replacer {
	return strings.NewReplacer("e-0", "e-", "e+0", "e", "e+", "e")
})

func solvedParts(w *markup.Writer, b *calcdoc.Block, set *SolveSet) {
	line := b.InfoPos.Line()
	anchor := fmt.Sprintf("S%d", line)

	// the method
	partOpen(w)
	w.WriteString("<p class=\"method\">")
	if set.Linear {
		form := ". The real form (real and imaginary parts as separate unknowns and equations) is solved"
		if set.ComplexLU {
			form = " and complex-linear: the complex matrix (one row per equation, one column per complex unknown) is solved"
		}
		fmt.Fprintf(w, "<strong>Linear, solved directly.</strong> The equations are affine in the unknowns (confirmed at %d further points to within %s)%s %s; condition number estimate κ₁ = %s.",
			numeric.LinearProbes, sci(numeric.LinearTol), form, markup.Esc(factorText(set.Factorization)), sci(set.Cond))
		if set.Refined {
			fmt.Fprintf(w, " The direct solution was refined by %d Newton iteration%s.", set.Iterations, markup.Plural(set.Iterations))
		}
	} else {
		fmt.Fprintf(w, "<strong>Non-linear, %d iteration%s.</strong> Solved iteratively by damped Newton–Raphson on the real form (real and imaginary parts as separate unknowns), Jacobian by finite differences, from the starting point: the scaled residual fell from %s to %s (tolerance %s",
			set.Iterations, markup.Plural(set.Iterations), sci(set.InitialResidualNorm), sci(set.ResidualNorm), sci(numeric.ResidualTol))
		if set.Criterion == numeric.ByStep {
			fmt.Fprintf(w, "; stopped when the Newton step fell below %s of the unknowns", sci(numeric.StepTol))
		}
		w.WriteString(").")
		if set.Polished {
			w.WriteString(" The residuals were then rescaled to the size of their terms at the solution found and iterated again, with central differences, until the backward error was met.")
		}
	}
	fmt.Fprintf(w, " Largest componentwise backward error at the solution: %s (accepted up to %s).</p>", sci(set.Backward), sci(SolveAcceptTol))

	// the matrix of a linear set
	if sys := set.System(); sys != nil {
		big := len(sys.Rows) > InlineSystemLimit || len(sys.Cols) > InlineSystemLimit
		form := "complex form"
		if !sys.Complex {
			form = "real form: Re and Im are the real and imaginary parts"
		}
		intro := fmt.Sprintf("As a linear system A·x = b (%s; A is %d×%d; for each equation, A·x − b is the side that holds the unknowns minus the other side, left minus right when both hold unknowns):", form, len(sys.Rows), len(sys.Cols))
		switch {
		case sys.A == nil:
			intro = fmt.Sprintf("As a linear system A·x = b (%s; A is %d×%d with %s non-zero entr%s; for each equation, A·x − b is the side that holds the unknowns minus the other side, left minus right when both hold unknowns):", form, len(sys.Rows), len(sys.Cols), group(len(sys.Entries)), ies(len(sys.Entries)))
			fmt.Fprintf(w, "<p>%s its non-zero entries and b are listed in the appendix, <a href=\"#%s\">equation set at line %d</a>.</p>", markup.Esc(intro), anchor, line)
			fmt.Fprintf(&w.Appendix, "<section class=\"solveapp\" id=\"%s\">\n<h3>Equation set at line %d: the non-zero entries of A and b</h3>\n<p>%s</p>\n", anchor, line, markup.Esc(intro))
			entryList(&w.Appendix, set, sys, w.Digits())
			w.Appendix.WriteString("</section>\n")
		case big:
			fmt.Fprintf(w, "<p>%s the matrix and vector are in the appendix, <a href=\"#%s\">equation set at line %d</a>.</p>", markup.Esc(intro), anchor, line)
			fmt.Fprintf(&w.Appendix, "<section class=\"solveapp\" id=\"%s\">\n<h3>Equation set at line %d: A and b</h3>\n<p>%s</p>\n", anchor, line, markup.Esc(intro))
			systemTable(&w.Appendix, set, sys, w.Digits(), false)
			w.Appendix.WriteString("</section>\n")
		default:
			fmt.Fprintf(w, "<p>%s</p>", markup.Esc(intro))
			var sb strings.Builder
			systemTable(&sb, set, sys, w.Digits(), true)
			w.WriteString(sb.String())
		}
	}

	// the Newton history
	if len(set.History) > 0 {
		var sb strings.Builder
		historyTable(&sb, set.History)
		if len(set.History) > InlineSystemLimit {
			fmt.Fprintf(w, "<p>The %d iterations are listed in the appendix, <a href=\"#%sn\">equation set at line %d</a>.</p>", len(set.History), anchor, line)
			fmt.Fprintf(&w.Appendix, "<section class=\"solveapp\" id=\"%sn\">\n<h3>Equation set at line %d: Newton iterations</h3>\n%s</section>\n", anchor, line, sb.String())
		} else {
			w.WriteString(sb.String())
		}
	}
	partClose(w)

	// the solution
	w.Printf("<div class=\"row sol\"><div class=\"ln\">%d</div><div>", line)
	for _, u := range set.Unknowns {
		disp := u.Display
		if b := w.Doc.Env.Lookup(u.Name); b != nil && b.Cases != nil {
			// solved per case: a line per case, marked with its case
			for k, c := range w.Doc.Front.Cases {
				if k >= len(b.Cases) {
					break
				}
				if b.Cases[k] == nil {
					w.Printf("<div class=\"r\" data-case=\"%s\"><span class=\"case\">%s</span>%s <span class=\"verdict none\">not solved in this case</span></div>", markup.Esc(c), markup.Esc(c), markup.Math(markup.NameML(u.Name)))
					continue
				}
				w.Printf("<div class=\"r\" data-value=\"%s\" data-line=\"%d\" data-case=\"%s\"><span class=\"case\">%s</span>%s</div>", markup.Esc(u.Name), u.Pos.Line(), markup.Esc(c), markup.Esc(c), markup.Math(markup.NameML(u.Name)+"<mo>=</mo>"+markup.ValueML(b.Cases[k], b.Display, w.Digits(), false)))
			}
			continue
		} else if b != nil && b.Value == expr.Value(u.Value) {
			disp = b.Display // the chosen display: the bracket, else the preferred unit
		}
		w.Printf("<div class=\"r\" data-value=\"%s\" data-line=\"%d\">%s</div>", markup.Esc(u.Name), u.Pos.Line(), markup.Math(markup.NameML(u.Name)+"<mo>=</mo>"+markup.ValueML(u.Value, disp, w.Digits(), false)))
		w.KindNote(u.Value)
	}
	w.WriteString("</div><div class=\"desc\">solution</div></div>\n")

	// the verification
	partOpen(w)
	w.WriteString("<p>Verification: both sides of every equation evaluated at the solution, in complex arithmetic (at full precision; the values are shown rounded). ω is the difference relative to the size of the equation's terms (its componentwise backward error).</p>\n")
	w.WriteString("<div class=\"grid\"><table class=\"data verify\" style=\"white-space: nowrap;\">\n<tr><th>equation</th><th>left side</th><th>right side</th><th>left − right</th><th>relative to its terms, ω</th></tr>\n")
	for _, e := range set.Equations {
		if e.LHS == nil {
			continue
		}
		w.Printf("<tr><td>%s</td><td>%s</td><td>%s</td><td>%s</td><td>%s</td></tr>\n",
			eqLabelHTML(e), markup.Math(markup.ValueML(e.LHS, nil, w.Digits(), false)), markup.Math(markup.ValueML(e.RHS, nil, w.Digits(), false)),
			markup.Math(diffML(e.Diff, w.Digits())), sci(e.Backward))
	}
	w.WriteString("</table></div>\n")
	partClose(w)
}

// factorText names the factorisation of a linear set: dense or sparse LU,
// the size of the matrix and its non-zero entries, and for the sparse LU
// why it was chosen (numeric.UseSparse), its pivot order and the entries
// of its factors.
func factorText(f numeric.Factorization) string {
	size := fmt.Sprintf("%d×%d, %s non-zero entr%s", f.Order, f.Order, group(f.NNZ), ies(f.NNZ))
	if !f.Sparse {
		return "by dense LU factorisation with partial pivoting of the scaled matrix (" + size + ")"
	}
	return fmt.Sprintf("by sparse LU factorisation of the scaled matrix (%s; sparse, as it has at least %d rows and at most %s of its entries are non-zero): pivots in Markowitz order (fewest new entries) under threshold partial pivoting (each pivot at least %s of the largest entry of its column), %s entries in the factors L and U, the solution refined against the matrix while that lowers its backward error",
		size, numeric.SparseMinOrder, pct(numeric.SparseMaxDensity), sci(sparse.Threshold), group(f.Fill))
}

// group writes a count with a comma between groups of three digits:
// "1,498".
func group(n int) string {
	s := strconv.Itoa(n)
	for i := len(s) - 3; i > 0; i -= 3 {
		s = s[:i] + "," + s[i:]
	}
	return s
}

func ies(n int) string {
	if n == 1 {
		return "y"
	}
	return "ies"
}

// pct writes a fraction as a percentage: "10 %".
func pct(f float64) string { return strconv.FormatFloat(100*f, 'g', -1, 64) + " %" }

// diffML typesets a difference; an exact zero is "0" in the unit.
func diffML(v *expr.Scalar, digits int) string {
	if v.Z == 0 {
		u := calcdoc.SIUnit(v.Dim)
		return "<mn>0</mn>" + markup.UnitML(u)
	}
	return markup.ValueML(v, nil, digits, false)
}

func eqLabelHTML(e *SolveEquation) string {
	if e.Eq.Label != nil {
		return fmt.Sprintf("%s <span class=\"at\">(line %d)</span>", markup.Esc(e.Eq.Label.Name), e.Line)
	}
	return fmt.Sprintf("line %d", e.Line)
}

// rowLabel and colLabel name a row or column of the system.
func rowLabel(set *SolveSet, r SystemIndex) string {
	e := set.Equations[r.Index]
	name := fmt.Sprintf("line %d", e.Line)
	if e.Eq.Label != nil {
		name = markup.Esc(e.Eq.Label.Name)
	}
	return partPrefix(r.Part) + name
}

func colLabel(set *SolveSet, c SystemIndex, mathML bool) string {
	u := set.Unknowns[c.Index]
	if mathML {
		return partPrefix(c.Part) + markup.Math(markup.NameML(u.Name))
	}
	return partPrefix(c.Part) + markup.NameHTML(u.Name)
}

func partPrefix(p Part) string {
	switch p {
	case RealPart:
		return "Re "
	case ImagPart:
		return "Im "
	}
	return ""
}

// systemTable writes A and b as a table: a row per equation (or part), a
// column per unknown (or part), then b. Entries carry their units; an
// exact zero is written 0. mathML selects MathML entries (in place) or
// plain text (the appendix, where the table may be large).
func systemTable(out markup.StringWriter, set *SolveSet, sys *SolveSystem, digits int, mathML bool) {
	var sb strings.Builder
	sb.WriteString("<div class=\"grid\"><table class=\"data system\" style=\"white-space: nowrap;\">\n<tr><th>equation</th>")
	for _, c := range sys.Cols {
		sb.WriteString("<th>" + colLabel(set, c, mathML) + "</th>")
	}
	sb.WriteString("<th>b</th></tr>\n")
	cell := func(s expr.Scalar) string {
		if s.Z == 0 {
			return "0"
		}
		if mathML {
			return markup.Math(markup.ValueML(&s, nil, digits, false))
		}
		return markup.Esc(expr.FormatScalar(&s, nil, digits).String())
	}
	for i, r := range sys.Rows {
		sb.WriteString("<tr><td>" + rowLabel(set, r) + "</td>")
		for k := range sys.Cols {
			sb.WriteString("<td>" + cell(sys.A.At(i, k)) + "</td>")
		}
		sb.WriteString("<td>" + cell(sys.B.At(i, 0)) + "</td></tr>\n")
	}
	sb.WriteString("</table></div>\n")
	out.WriteString(sb.String())
}

// entryList writes the non-zero entries of A row by row, and b's, as
// plain text: the appendix of a system larger than FullTableLimit.
func entryList(out markup.StringWriter, set *SolveSet, sys *SolveSystem, digits int) {
	var sb strings.Builder
	sb.WriteString("<div class=\"grid\"><table class=\"data system\" style=\"white-space: nowrap;\">\n<tr><th>row</th><th>equation</th><th>column</th><th>unknown</th><th>entry of A</th></tr>\n")
	txt := func(s expr.Scalar) string { return markup.Esc(expr.FormatScalar(&s, nil, digits).String()) }
	// each row's and column's cells, made once
	rows := make([]string, len(sys.Rows))
	for i, r := range sys.Rows {
		rows[i] = "<tr><td>" + strconv.Itoa(i+1) + "</td><td>" + rowLabel(set, r) + "</td><td>"
	}
	cols := make([]string, len(sys.Cols))
	for k, c := range sys.Cols {
		cols[k] = strconv.Itoa(k+1) + "</td><td>" + colLabel(set, c, false) + "</td><td>"
	}
	sb.Grow(len(sys.Entries) * 120)
	for _, e := range sys.Entries {
		sb.WriteString(rows[e.Row])
		sb.WriteString(cols[e.Col])
		sb.WriteString(txt(e.V))
		sb.WriteString("</td></tr>\n")
	}
	sb.WriteString("</table></div>\n<div class=\"grid\"><table class=\"data system\" style=\"white-space: nowrap;\">\n<tr><th>row</th><th>equation</th><th>b</th></tr>\n")
	for i, r := range sys.Rows {
		v := sys.B.At(i, 0)
		if v.Z == 0 {
			continue
		}
		fmt.Fprintf(&sb, "<tr><td>%d</td><td>%s</td><td>%s</td></tr>\n", i+1, rowLabel(set, r), txt(v))
	}
	sb.WriteString("</table></div>\n<p>Every entry of A and b not listed is 0.</p>\n")
	out.WriteString(sb.String())
}

// historyTable lists the Newton iterations.
func historyTable(sb *strings.Builder, h []numeric.Step) {
	sb.WriteString("<div class=\"grid\"><table class=\"data history\" style=\"white-space: nowrap;\">\n<tr><th>iteration</th><th>scaled residual after the step</th><th>scaled step</th><th>step taken</th></tr>\n")
	for _, s := range h {
		kind := "full Newton step"
		switch {
		case s.Levenberg > 0:
			kind = "Levenberg–Marquardt step, λ = " + sci(s.Levenberg)
		case s.Damping < 1:
			kind = "damped Newton step, t = " + sci(s.Damping)
		}
		fmt.Fprintf(sb, "<tr><td>%d</td><td>%s</td><td>%s</td><td>%s</td></tr>\n", s.Iteration, sci(s.ResidualNorm), sci(s.StepSize), markup.Esc(kind))
	}
	sb.WriteString("</table></div>\n")
}
