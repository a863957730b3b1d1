package calc

import (
	"calcdoc/calcdoc"
	"calcdoc/expr"
	"calcdoc/render/markup"
)

func renderCalc(w *markup.Writer, b *calcdoc.Block) {
	w.Printf("<div class=\"block calc\" id=\"B%d\">\n", b.Pos.Line())
	stmts, _ := b.Result.([]*calcdoc.Stmt)
	for _, st := range stmts {
		w.Stmt(st)
	}
	// errors that belong to no statement
	inStmts := map[*expr.Error]bool{}
	for _, st := range stmts {
		for _, x := range st.Errs {
			inStmts[x] = true
		}
	}
	for _, e := range b.Errors {
		if !inStmts[e] {
			w.ErrorRow(e)
		}
	}
	w.WriteString("</div>\n")
}
