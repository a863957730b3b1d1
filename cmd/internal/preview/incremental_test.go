package preview

import (
	"bytes"
	"fmt"
	"math/rand"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/cmd/internal/build"
	"calcdoc/render"
)

// editDoc is a document of our own invention that a test edits at random:
// front matter, sections of prose (with inline values) each followed by
// a fenced block (calc, or a table read from a CSV file).
type editDoc struct {
	title  string
	digits int
	cases  bool
	secs   []*editSec
	next   int      // the number of the next name
	broken *editSec // the section holding a broken line to fix, or nil
	bad    int      // its line
}

type editSec struct {
	prose []string
	info  string // "calc", "table cu from cu.csv"
	lines []string
}

func (d *editDoc) text() string {
	var b strings.Builder
	b.WriteString("---\ntitle: " + d.title + "\n")
	if d.digits != 0 {
		fmt.Fprintf(&b, "digits: %d\n", d.digits)
	}
	if d.cases {
		b.WriteString("cases: [max, min]\n")
	}
	b.WriteString("---\n\n# Feeder voltages\n\n")
	for _, s := range d.secs {
		for _, p := range s.prose {
			b.WriteString(p + "\n\n")
		}
		b.WriteString("```" + s.info + "\n")
		for _, l := range s.lines {
			b.WriteString(l + "\n")
		}
		b.WriteString("```\n\n")
	}
	return b.String()
}

var (
	defRE  = regexp.MustCompile(`^(a_[0-9]+) =`)
	funcRE = regexp.MustCompile(`^(f_[0-9]+)\(x\)`)
)

// above lists the values and functions defined above line i of section
// at (i < 0: above the section).
func (d *editDoc) above(at *editSec, i int) (vals, funcs []string) {
	for _, s := range d.secs {
		for j, l := range append(s.lines, "") {
			if s == at && (i < 0 || j >= i) {
				return vals, funcs
			}
			if m := defRE.FindStringSubmatch(l); m != nil {
				vals = append(vals, m[1])
			} else if m := funcRE.FindStringSubmatch(l); m != nil {
				funcs = append(funcs, m[1])
			} else if strings.HasPrefix(l, "use v_ext") {
				vals = append(vals, "v_ext")
			} else if strings.HasPrefix(l, "source:") {
				funcs = append(funcs, "cu") // the table
			}
		}
	}
	return vals, funcs
}

// stmt is a new statement for line i of section at, mostly using names
// defined above it (now and then one that is not: an error).
func (d *editDoc) stmt(r *rand.Rand, at *editSec, i int) string {
	vals, funcs := d.above(at, i)
	pick := func() string {
		return vals[r.Intn(len(vals))]
	}
	n := fmt.Sprintf("a_%d", d.next)
	d.next++
	desc := ""
	if r.Intn(3) == 0 {
		desc = "   # branch " + n
	}
	switch c := r.Intn(10); {
	case c < 3 || len(vals) == 0:
		return fmt.Sprintf("%s = %d.%d V%s", n, r.Intn(400), r.Intn(10), desc)
	case c < 5:
		return fmt.Sprintf("%s = %s + 2*%s%s", n, pick(), pick(), desc)
	case c == 5:
		return fmt.Sprintf("check %s <= %d V%s", pick(), 100+r.Intn(400), desc)
	case c == 6:
		return fmt.Sprintf("f_%d(x) = 2*x + 1 V", d.next-1)
	case c == 7 && d.cases:
		return fmt.Sprintf("%s = {max: 1.1, min: 0.9} * %s", n, pick())
	case c == 8 || len(funcs) > 0 && funcs[0] == "cu" && len(funcs) == 1:
		return fmt.Sprintf("%s = %s / 3", n, pick())
	case len(funcs) > 0:
		f := funcs[r.Intn(len(funcs))]
		if f == "cu" {
			return fmt.Sprintf("%s = cu.R(2.5 mm²) * 100 m * 1 A%s", n, desc)
		}
		return fmt.Sprintf("%s = %s(%s)", n, f, pick())
	}
	return fmt.Sprintf("%s = %s / 3", n, pick())
}

// referenced reports whether a name that lines define is used elsewhere.
func (d *editDoc) referenced(lines []string) bool {
	text := d.text()
	for _, l := range lines {
		m := defRE.FindStringSubmatch(l)
		if m == nil {
			m = funcRE.FindStringSubmatch(l)
		}
		if m != nil && len(regexp.MustCompile(`\b`+m[1]+`\b`).FindAllStringIndex(text, 3)) > 1 {
			return true
		}
	}
	return false
}

func (d *editDoc) calcSecs() []*editSec {
	var out []*editSec
	for _, s := range d.secs {
		if s.info == "calc" {
			out = append(out, s)
		}
	}
	return out
}

var numberRE = regexp.MustCompile(` ([0-9]+\.[0-9]|[0-9]+) V`)

// edit makes one random edit of the document or of a file it reads (in
// dir), and says what it was.
func (d *editDoc) edit(r *rand.Rand, dir string) string {
	if d.broken != nil {
		d.broken.lines[d.bad] = d.stmt(r, d.broken, d.bad)
		d.broken = nil
		return "fix the broken line"
	}
	calcs := d.calcSecs()
	s := calcs[r.Intn(len(calcs))]
	// edits towards the end are the common case of a preview
	if r.Intn(2) == 0 {
		s = calcs[len(calcs)-1-r.Intn(min(2, len(calcs)))]
	}
	switch op := r.Intn(24); {
	case op < 5:
		for tries := 0; tries < 5; tries++ {
			i := r.Intn(len(s.lines))
			if loc := numberRE.FindStringIndex(s.lines[i]); loc != nil {
				s.lines[i] = s.lines[i][:loc[0]] + fmt.Sprintf(" %d V", r.Intn(300)) + s.lines[i][loc[1]:]
				return "change a number"
			}
		}
		return "no number found"
	case op < 8:
		i := r.Intn(len(s.lines) + 1)
		s.lines = append(s.lines[:i], append([]string{d.stmt(r, s, i)}, s.lines[i:]...)...)
		return "insert a statement"
	case op < 10:
		if i := r.Intn(len(s.lines)); len(s.lines) > 1 && !d.referenced(s.lines[i:i+1]) && !strings.HasPrefix(s.lines[i], "use") {
			s.lines = append(s.lines[:i], s.lines[i+1:]...)
		}
		return "delete a statement"
	case op < 11:
		ns := &editSec{prose: []string{"## More branches"}, info: "calc"}
		i := 2 + r.Intn(len(d.secs)-1)
		d.secs = append(d.secs[:i], append([]*editSec{ns}, d.secs[i:]...)...)
		ns.lines = []string{d.stmt(r, ns, 0)}
		ns.lines = append(ns.lines, d.stmt(r, ns, 1))
		if vals, _ := d.above(ns, -1); len(vals) > 0 {
			ns.prose = append(ns.prose, fmt.Sprintf("Branch currents, with `=%s` from above.", vals[r.Intn(len(vals))]))
		}
		return "add a block"
	case op < 12:
		if len(calcs) > 2 && !d.referenced(s.lines) && !strings.Contains(strings.Join(s.lines, "\n"), "use v_ext") {
			for i, x := range d.secs {
				if x == s {
					d.secs = append(d.secs[:i], d.secs[i+1:]...)
					break
				}
			}
		}
		return "remove a block"
	case op < 13:
		switch r.Intn(3) {
		case 0:
			d.digits = []int{0, 3, 5}[r.Intn(3)]
		case 1:
			d.cases = !d.cases || strings.Contains(d.text(), "{max")
		default:
			d.title = fmt.Sprintf("Feeder %d", r.Intn(100))
		}
		return "change the front matter"
	case op < 15:
		switch r.Intn(3) {
		case 0:
			if vals, _ := d.above(s, -1); len(vals) > 0 {
				s.prose = append(s.prose, fmt.Sprintf("The value `=%s` is read here.", vals[r.Intn(len(vals))]))
			}
		case 1:
			s.prose = append(s.prose, "A remark of two\nlines.")
		default:
			if len(s.prose) > 0 {
				s.prose[len(s.prose)-1] += " (checked)"
			}
		}
		return "edit prose"
	case op < 17:
		i := r.Intn(len(s.lines) + 1)
		bad := fmt.Sprintf("b_%d = (1 + 2", d.next)
		if r.Intn(2) == 0 {
			bad = fmt.Sprintf("b_%d = a_%d + 1 V", d.next, d.next+1) // a name not defined
		}
		s.lines = append(s.lines[:i], append([]string{bad}, s.lines[i:]...)...)
		d.next++
		d.broken, d.bad = s, i
		return "break a line"
	case op < 18:
		if err := os.WriteFile(filepath.Join(dir, "other.md"), []byte(otherSheet(r.Intn(5))), 0o644); err != nil {
			panic(err)
		}
		return "move the used sheet's value"
	case op < 19:
		if err := os.WriteFile(filepath.Join(dir, "cu.csv"), []byte(cuCSV(r.Intn(3))), 0o644); err != nil {
			panic(err)
		}
		return "change the CSV file"
	case op >= 21:
		return d.digitInPlace(r, calcs)
	default:
		return "save unchanged"
	}
}

// digitInPlace changes one digit of a number in one of the first calc
// blocks to another (or the same) digit from 1 to 9, or writes one more
// digit: the lines below keep their numbers and columns, so the blocks
// below that read no name whose value moved draw as before.
func (d *editDoc) digitInPlace(r *rand.Rand, calcs []*editSec) string {
	s := calcs[r.Intn(min(3, len(calcs)))]
	for tries := 0; tries < 5; tries++ {
		i := r.Intn(len(s.lines))
		l := s.lines[i]
		eq := strings.Index(l, "= ")
		if eq < 0 || strings.HasPrefix(l, "use") {
			continue
		}
		var at []int // digits of numbers, not of names
		for j := eq; j < len(l) && l[j] != '#'; j++ {
			if c := l[j]; c >= '0' && c <= '9' && (l[j-1] == ' ' || l[j-1] == '.' || l[j-1] >= '0' && l[j-1] <= '9' && !inName(l, j)) {
				at = append(at, j)
			}
		}
		if len(at) == 0 {
			continue
		}
		j := at[r.Intn(len(at))]
		// never 0: a divisor of 0 would leave an error for good
		digit := string(rune('1' + r.Intn(9)))
		if r.Intn(2) == 0 {
			// one digit more: the text below moves by a byte, its lines
			// and columns stay
			s.lines[i] = l[:j] + digit + l[j:]
		} else {
			s.lines[i] = l[:j] + digit + l[j+1:]
		}
		return "change a digit in place in a first block"
	}
	return "no digit found in a first block"
}

// inName reports whether the digit at j of l ends a run that starts with
// a letter or '_' (a name such as a_12).
func inName(l string, j int) bool {
	for j > 0 && (l[j-1] >= '0' && l[j-1] <= '9') {
		j--
	}
	return j > 0 && (l[j-1] == '_' || l[j-1] >= 'a' && l[j-1] <= 'z' || l[j-1] >= 'A' && l[j-1] <= 'Z')
}

// otherSheet is the sheet the document uses: its value moves with k.
func otherSheet(k int) string {
	return fmt.Sprintf("---\ntitle: Supply\n---\n\n```calc\nv_ext = %d V   # supply voltage\n```\n", 220+5*k)
}

// cuCSV is a small table of our own: its middle row moves with k.
func cuCSV(k int) string {
	return fmt.Sprintf("S [mm²],R [Ω/km]\n1.5,12.1\n2.5,%d.41\n4,4.61\n", 7+k)
}

func newEditDoc(r *rand.Rand) *editDoc {
	d := &editDoc{title: "Feeder"}
	d.secs = append(d.secs, &editSec{prose: []string{"## Supply", "The supply is taken from the supply sheet."}, info: "calc", lines: []string{"use v_ext from other.md"}})
	d.secs = append(d.secs, &editSec{prose: []string{"## Conductor data"}, info: "table cu from cu.csv", lines: []string{"source: test data of our own"}})
	// the other kinds, taken over and drawn again
	d.secs = append(d.secs, &editSec{prose: []string{"## Supply current"}, info: "solve I_s[A]", lines: []string{"supply: v_ext = I_s * (2 + j1) Ω"}})
	d.secs = append(d.secs, &editSec{prose: []string{"Its phasors."}, info: "phasors v_ext, I_s * 1 Ω", lines: []string{"Supply voltage and current"}})
	d.secs = append(d.secs, &editSec{prose: []string{"The supply impedance over frequency."}, info: "sweep f = 10 Hz .. 1 kHz log 12", lines: []string{"Z_f = 1 Ω + j*2*pi*f*1 mH", "|Z_f|"}})
	for i := 0; i < 6; i++ {
		sec := &editSec{prose: []string{fmt.Sprintf("## Section %d", i+1), "Branch values."}, info: "calc"}
		d.secs = append(d.secs, sec)
		for j := 0; j < 6; j++ {
			sec.lines = append(sec.lines, d.stmt(r, sec, j))
		}
	}
	return d
}

// TestIncrementalSameBytes checks the incremental preview's one promise
// over a long sequence of random edits: after each, the sheet of
// calcdoc.Reevaluate (from the evaluation before, drawn through the block
// cache of the sheet before) is byte for byte the sheet of a full build
// of the same source (calcdoc.ParseWith, drawn whole). The edits change
// numbers, insert and delete statements, add and remove blocks, change
// the front matter (digits, cases, title), edit prose and its inline
// values, break a line and fix it, change a used sheet's value and a
// CSV file the document reads, and change a digit of a number in one of
// the first calc blocks in place (no line below moves: the blocks below
// that read no value that moved are copied, Block.DrawnLike).
func TestIncrementalSameBytes(t *testing.T) {
	steps := 400
	if testing.Short() {
		steps = 80
	}
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "other.md"), []byte(otherSheet(0)), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "cu.csv"), []byte(cuCSV(0)), 0o644); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "doc.md")
	r := rand.New(rand.NewSource(20))
	d := newEditDoc(r)
	in := calcdoc.Inputs{Root: dir}
	cache := &render.BlockCache{}
	var prev *calcdoc.Document
	var prevSheet []byte
	reusedSteps, copied, drawn, errSteps := 0, 0, 0, 0
	firstEdits, copiedBelow := 0, 0 // in-place edits of a first block; calc blocks below it copied (Block.DrawnLike)
	for step := 0; step < steps; step++ {
		what := "first"
		if step > 0 {
			what = d.edit(r, dir)
		}
		src := []byte(d.text())
		full, inc, got, diff := incrementalAgainstFull(t, prev, path, src, in, cache)
		if diff != "" {
			t.Fatalf("step %d (%s): %s\nsource:\n%s", step, what, diff, src)
		}
		if prev != nil && step%20 == 0 {
			// the evaluation taken over from is not changed
			again, _ := build.Sheet(prev, build.Options{Version: "test", EmbedSource: true})
			if !bytes.Equal(again, prevSheet) {
				t.Fatalf("step %d (%s): Reevaluate changed the document it took over from", step, what)
			}
		}
		if inc.Reused() > 0 {
			reusedSteps++
		}
		if len(full.Errors) > 0 {
			errSteps++
		}
		copied += cache.Copied
		drawn += cache.Drawn
		if what == "change a digit in place in a first block" {
			firstEdits++
			for _, b := range inc.Blocks {
				if !b.TakenOver() && b.DrawnLike() != 0 {
					copiedBelow++
				}
			}
		}
		prev, prevSheet = inc, got
	}
	t.Logf("%d steps: %d took blocks over, %d had errors; calc blocks copied %d, drawn %d; %d in-place edits of a first block, %d calc blocks below one copied",
		steps, reusedSteps, errSteps, copied, drawn, firstEdits, copiedBelow)
	// the sequence must exercise what it checks
	if reusedSteps < steps/3 || copied < drawn/2 || errSteps < steps/20 || errSteps == steps || firstEdits < steps/20 || copiedBelow < firstEdits {
		t.Errorf("the edits exercise too little: %d of %d steps took blocks over, %d copied and %d drawn, %d with errors, %d in-place edits of a first block with %d blocks copied below",
			reusedSteps, steps, copied, drawn, errSteps, firstEdits, copiedBelow)
	}
}

func firstDiff(a, b []byte) int {
	i := 0
	for i < len(a) && i < len(b) && a[i] == b[i] {
		i++
	}
	return i
}

func around(b []byte, i int) string {
	return string(b[max(0, i-150):min(len(b), i+150)])
}

// TestServedSameAsBuilt checks that the page watch serves after each save,
// evaluated from the save before (calcdoc.Reevaluate and the block
// cache), is the sheet build writes for the same source, byte for byte,
// once the live script's head lines are taken out.
func TestServedSameAsBuilt(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "doc.md")
	if err := os.WriteFile(p, []byte(longDoc(0, 4, true)), 0o644); err != nil {
		t.Fatal(err)
	}
	h := start(t, Config{Paths: []string{dir}})
	u, took := 230, 0
	for k := 1; k <= 8; k++ {
		if k%3 == 0 { // an edit in a block above the last
			u = 200 + k
		}
		src := strings.Replace(longDoc(k, 4, true), "U_100 = 230 V", fmt.Sprintf("U_100 = %d V", u), 1)
		if err := os.WriteFile(p, []byte(src), 0o644); err != nil {
			t.Fatal(err)
		}
		marker := fmt.Sprintf(`<div class="desc">save-%d</div>`, k)
		body := h.wait("/doc.html", func(st int, body string) string {
			if st != 200 || !strings.Contains(body, marker) || strings.Contains(body, `class="calcdoc-pending"`) {
				return "save " + fmt.Sprint(k) + " not shown yet (or a newer one being evaluated)"
			}
			return ""
		})
		h.w.mu.RLock()
		reused, cached := h.w.bases["doc.html"].doc.Reused(), h.w.bases["doc.html"].cache.Copied
		h.w.mu.RUnlock()
		if k%3 != 0 && reused == 3 && cached == 3 {
			took++
		}
		v, _ := pageVersion(t, body)
		served := strings.Replace(body, liveHead("/doc.html", v), "", 1)
		doc := calcdoc.ParseWith(filepath.Join(dir, "doc.md"), []byte(src), kind.Standard(), calcdoc.Inputs{Root: dir})
		built, err := build.Sheet(doc, build.Options{Version: "test"})
		if err != nil {
			t.Fatal(err)
		}
		if served != string(built) {
			i := firstDiff([]byte(served), built)
			t.Fatalf("save %d: the served page differs from the built sheet at byte %d:\nserved: %q\nbuilt:  %q", k, i, around([]byte(served), i), around(built, i))
		}
	}
	// a save read while the test wrote the next (a file caught half
	// written, under load) is evaluated whole: most are not
	if took < 3 {
		t.Errorf("%d of the 6 saves in the last block were evaluated from the save before (3 blocks taken over and copied), want most", took)
	}
}

// incrementalAgainstFull evaluates src in full and again from prev
// (calcdoc.Reevaluate, its sheet drawn through cache: got), each sheet as
// build writes it, carrying its source, data files and used values (the
// stamp's git facts are not of these tests); diff says where the two
// sheets first differ ("" when they are the same bytes).
func incrementalAgainstFull(t *testing.T, prev *calcdoc.Document, path string, src []byte, in calcdoc.Inputs, cache *render.BlockCache) (full, inc *calcdoc.Document, got []byte, diff string) {
	t.Helper()
	reg := kind.Standard()
	full = calcdoc.ParseWith(path, src, reg, in)
	want, err := build.Sheet(full, build.Options{Version: "test", EmbedSource: true})
	if err != nil {
		t.Fatal(err)
	}
	inc = calcdoc.Reevaluate(prev, path, src, reg, in)
	got, err = build.Sheet(inc, build.Options{Version: "test", EmbedSource: true, Blocks: cache})
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, want) {
		i := firstDiff(got, want)
		diff = fmt.Sprintf("the incremental sheet differs from the full build at byte %d:\nincremental: %q\nfull:        %q", i, around(got, i), around(want, i))
	}
	return full, inc, got, diff
}
