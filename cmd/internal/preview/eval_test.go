package preview

import (
	"fmt"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// heavyDoc is save k with a block of 2^40 calls of nested user functions,
// which spends the document's whole work budget (a second or more).
func heavyDoc(k int) string {
	var b strings.Builder
	b.WriteString(docSrc(k) + "\n```calc\nf_0(x) = x\n")
	for i := 1; i <= 40; i++ {
		fmt.Fprintf(&b, "f_%d(x) = f_%d(x) + f_%d(x)\n", i, i-1, i-1)
	}
	b.WriteString("z = f_40(1)\n```\n")
	return b.String()
}

// TestSlowBesideFast: documents evaluate independently. While a slow
// document's newer save evaluates (held here as long as the test needs),
// a fast document's save is shown; the slow one's page still shows its
// last sheet with a banner saying a newer save is being evaluated, and
// the listing says so. A save made meanwhile stops the one being
// evaluated, whose result is not shown; once done, the banner goes.
func TestSlowBesideFast(t *testing.T) {
	dir := t.TempDir()
	fast, slow := filepath.Join(dir, "fast.md"), filepath.Join(dir, "slow.md")
	write(t, fast, docSrc(1))
	write(t, slow, docSrc(1))
	h := start(t, Config{Paths: []string{dir}})
	h.wait("/slow.html", showsSave(1))

	entered := make(chan struct{}, 4)
	release := make(chan struct{})
	hold := func(j *evalJob) {
		if j.key == "slow.html" {
			entered <- struct{}{}
			<-release
		}
	}
	beforeEval.Store(&hold)
	released := false
	defer func() {
		if !released {
			close(release)
		}
		beforeEval.Store(nil)
	}()

	saveRenameOver(t, slow, heavyDoc(2))
	select {
	case <-entered:
	case <-time.After(deadline):
		t.Fatal("the slow document's evaluation did not start")
	}
	saveRenameOver(t, fast, docSrc(2))
	h.wait("/fast.html", showsSave(2)) // while slow.md is still evaluating

	st, body := h.get("/slow.html")
	if why := showsSave(1)(st, body); why != "" {
		t.Errorf("the slow page while its save evaluates: %s", why)
	}
	if !strings.Contains(body, `class="calcdoc-pending"`) || !strings.Contains(body, "A newer save of this document") {
		t.Errorf("the slow page has no banner saying a newer save is being evaluated")
	}
	if v, _ := pageVersion(t, body); !strings.HasSuffix(v, "-evaluating") {
		t.Errorf("the slow page's version %q is not marked as evaluating", v)
	}
	_, list := h.get("/")
	if state := listing(list)["/slow.html"]; !strings.Contains(state, "evaluating a newer save") {
		t.Errorf("the listing says %q for slow.html", state)
	}
	if state := listing(list)["/fast.html"]; strings.Contains(state, "evaluating") {
		t.Errorf("the listing says %q for fast.html", state)
	}

	// a newer save supersedes the heavy one being evaluated
	saveRenameOver(t, slow, docSrc(3))
	time.Sleep(3 * MaxDelay) // the save is seen and waits as the next job
	close(release)
	released = true
	h.wait("/slow.html", showsSave(3))
	h.wait("/slow.html", func(st int, body string) string {
		if strings.Contains(body, `class="calcdoc-pending"`) {
			return "the banner is still there"
		}
		return ""
	})
	if log := h.log.String(); !strings.Contains(log, "slow.md: evaluation stopped after") {
		t.Errorf("the log does not say the superseded save's evaluation was stopped:\n%s", log)
	}
}

// TestSameAsLatestAfterEvaluation: a file read again just as the
// evaluation of its bytes ended (the page served when the read began is
// the one before) is not evaluated a second time: the page served now
// holds those bytes. A save seen twice (an atomic save's rename reported
// by both inotify instances) once gave a second version of one save.
func TestSameAsLatestAfterEvaluation(t *testing.T) {
	w := &Watcher{docs: map[string]*page{}, evals: map[string]*evalState{}}
	old := &page{key: "a.html", file: "/d/a.md", src: []byte("old")}
	w.docs["a.html"] = &page{key: "a.html", file: "/d/a.md", src: []byte("new")}
	if !w.sameAsLatest("a.html", old, []byte("new")) {
		t.Error("the bytes of the page served now are taken for a change")
	}
	if w.sameAsLatest("a.html", old, []byte("newer")) {
		t.Error("a change is taken for the page served now")
	}
	// another file at the address (an earlier PATH's) says nothing of this one
	w.docs["a.html"] = &page{key: "a.html", file: "/e/a.md", src: []byte("new")}
	if w.sameAsLatest("a.html", old, []byte("new")) {
		t.Error("another file's page is taken for this file's")
	}
}
