package sweep

import "calcdoc/calcdoc"

// SweepCellWork is the work charged to the document's budget for each
// line of a sweep at each point before the sweep is evaluated: the
// sweep's table of values (a complex number a line and a point) is made
// first, so a sweep too large for the budget is refused before its memory
// is taken (a 1 MB document of sweeps of 2,000 lines and 10,000 points
// would otherwise hold gigabytes). The evaluation of each line at each
// point is charged as it runs (expr.KeyedWork and its nodes).
const SweepCellWork = 10

// sweepWork charges a sweep's table; it records the budget's error and
// returns false when the budget cannot hold it.
func sweepWork(b *calcdoc.Block, sw *Sweep) bool {
	cells := int64(len(sw.X)) * int64(len(sw.Lines))
	if err := b.Env().Budget.Charge(SweepCellWork*cells, b.InfoPos); err != nil {
		b.Errors = append(b.Errors, err)
		return false
	}
	return true
}
