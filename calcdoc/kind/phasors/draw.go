package phasors

import (
	"fmt"
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/expr"
	"calcdoc/render/markup"
	"calcdoc/render/svg"
)

// renderPhasors draws a phasors block: a figure with the inline SVG
// diagram and a caption that holds the block's caption line and the value
// of every arrow, then the block's errors.
func renderPhasors(w *markup.Writer, b *calcdoc.Block) {
	res, _ := b.Result.(*Phasors)
	w.Printf("<div class=\"block phasors\" id=\"B%d\">\n", b.Pos.Line())
	phasorFigure(w, b, res, fmt.Sprintf("L%d", b.InfoPos.Line()))
	if res != nil {
		for _, c := range res.CaseDiagrams {
			phasorFigure(w, b, c, fmt.Sprintf("L%d-%s", b.InfoPos.Line(), c.Case))
		}
	}
	for _, e := range b.Errors {
		w.ErrorRow(e)
	}
	if res != nil {
		for _, it := range res.Items {
			if it.Unavailable != nil {
				w.UnavailableRow(it.Unavailable)
			}
		}
	}
	w.WriteString("</div>\n")
}

// phasorFigure draws one diagram (one per case for a block worked per
// case, under its case's name).
func phasorFigure(w *markup.Writer, b *calcdoc.Block, res *Phasors, id string) {
	w.Printf("<figure class=\"phasors\" id=\"%s\">\n", markup.Esc(id))
	var arrows []svg.Arrow
	var vals []string
	if res != nil {
		arrows = phasorArrows(res)
		f := w.ExprMLFor(false, nil)
		for _, it := range res.Items {
			if !it.OK() {
				continue
			}
			var lhs string
			if id, ok := it.Node.(*expr.Ident); ok {
				lhs = markup.NameML(id.Name)
			} else {
				lhs = f.Node(it.Node, false)
			}
			vals = append(vals, markup.Math(lhs+"<mo>=</mo>"+markup.ValueML(it.Value, it.Display, w.Digits(), false)))
		}
	}
	if len(arrows) > 0 {
		pic, err := svg.PhasorDiagram(arrows, "")
		if err != nil {
			if len(b.DrawErrors) == 0 { // else shown with the block's errors
				w.ErrorRow(phasorDrawErr(b, err))
			}
		} else {
			w.WriteString(pic)
		}
	}
	w.WriteString("<figcaption>")
	if res != nil && res.Case != "" {
		w.Printf("<span class=\"case\">%s</span> ", markup.Esc(res.Case))
	}
	if res != nil && res.Caption != "" {
		w.WriteString(markup.Esc(res.Caption))
	}
	if len(vals) > 0 {
		if res.Caption != "" {
			w.WriteString("<br>")
		}
		w.Printf("<span class=\"vals\">%s</span>", strings.Join(vals, "; "))
	}
	w.WriteString("</figcaption>\n</figure>\n")
}

// phasorArrows are the arrows of a phasor diagram: one per entry with a
// value, in order, labelled as the sheet typesets the entry, each from its
// tail (the tip of the entry it is drawn from, or the origin).
func phasorArrows(res *Phasors) []svg.Arrow {
	var arrows []svg.Arrow
	for _, it := range res.Items {
		if it.OK() {
			arrows = append(arrows, svg.Arrow{Label: it.Text, Runs: markup.LabelRuns(it.Node), Re: it.Re, Im: it.Im, X0: it.X0, Y0: it.Y0, Scale: it.Unit})
		}
	}
	return arrows
}

// checkPhasorsDrawing reports a phasor diagram that cannot be drawn.
func checkPhasorsDrawing(b *calcdoc.Block) []*expr.Error {
	res, _ := b.Result.(*Phasors)
	if res == nil {
		return nil
	}
	arrows := phasorArrows(res)
	if len(arrows) == 0 {
		return nil
	}
	if err := svg.CheckPhasors(arrows); err != nil {
		return []*expr.Error{phasorDrawErr(b, err)}
	}
	return nil
}

// phasorDrawErr is the error of a phasor diagram that cannot be drawn.
func phasorDrawErr(b *calcdoc.Block, err error) *expr.Error {
	return expr.Errorf(b.InfoPos, "the diagram could not be drawn: %s", err.Error())
}
