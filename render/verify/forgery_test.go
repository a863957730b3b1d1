package verify

import (
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/render"
	"calcdoc/render/internal/sheettest"
	"calcdoc/render/pack"
	"calcdoc/render/stamp"
)

// failDoc holds a check that fails: I = 230 V / 10 Ω = 23 A (Ohm's law,
// common practice), which exceeds 20 A.
const failDoc = "---\ntitle: Forgery test, failing check\nnumber: FG-E-001\n---\n\n```calc\nV = 230 V\nR = 10 ohm\nI = V / R\ncheck I <= 20 A\n```\n"

// forgeryPackage is a package of the heater sheet and the failing sheet,
// so that it carries the NOT FOR ISSUE marker and the cover reads "1 of 1
// checks not satisfied" for sheet 2.
func forgeryPackage(t *testing.T) string {
	t.Helper()
	return string(buildPackage(t, []pkgFile{{"heater.md", sheettest.HeaterDoc}, {"fail.md", failDoc}}))
}

// mustFail checks that page fails verify and that some difference (of the
// file or of a sheet) says every one of say.
func mustFail(t *testing.T, page string, say ...string) {
	t.Helper()
	rep, err := Verify([]byte(page), "test")
	if err != nil {
		t.Fatal(err)
	}
	var msgs []string
	for _, d := range rep.PackageDifferences {
		msgs = append(msgs, d.Message)
	}
	for _, s := range rep.Sheets {
		for _, d := range s.Differences {
			msgs = append(msgs, d.Message)
		}
	}
	if rep.OK() {
		t.Fatalf("the forgery verifies")
	}
	all := strings.Join(msgs, "\n")
	for _, s := range say {
		if !strings.Contains(all, s) {
			t.Errorf("no difference says %q:\n%s", s, all)
		}
	}
}

func replaceOnce(t *testing.T, s, old, new string) string {
	t.Helper()
	if !strings.Contains(s, old) {
		t.Fatalf("no %q in the page", old)
	}
	return strings.Replace(s, old, new, 1)
}

// The forgeries of issue 14, made on a package: each fails verify and the
// message names the part of the file that differs.
func TestVerifyPackageForgeries(t *testing.T) {
	page := forgeryPackage(t)
	if rep, err := Verify([]byte(page), "test"); err != nil || !rep.OK() {
		t.Fatalf("the genuine package does not verify: %v %+v", err, rep)
	}
	if !strings.Contains(page, "1 of 1 checks not satisfied") || !strings.Contains(page, "NOT FOR ISSUE") {
		t.Fatal("the package does not show its failing check and marker")
	}
	pkgHash := regexp.MustCompile(`data-package-sha256="([0-9a-f]{64})"`).FindStringSubmatch(page)[1]
	forged := "f" + pkgHash[1:]
	if forged == pkgHash {
		forged = "0" + pkgHash[1:]
	}
	cases := []struct {
		name string
		page string
		say  []string
	}{
		{"a style in the head hides the marker and restyles the failing check",
			replaceOnce(t, page, "</head>", "<style>.marker{display:none} .check.fail{color:green}</style>\n</head>"),
			[]string{"first difference at line", "in <head>", "<style>.marker{display:none}"}},
		{"a script in the head",
			replaceOnce(t, page, "</head>", "<script>document.title='x'</script>\n</head>"),
			[]string{"script: the file holds 1 <script> element(s) where calcdoc writes 0", "in <head>"}},
		{"the cover reads 1 of 1 checks satisfied",
			replaceOnce(t, page, "<td>1 of 1 checks not satisfied</td>", "<td>1 of 1 checks satisfied</td>"),
			[]string{`<section class="cover"> > <table class="pkg-sheets"> > <tr data-sheet="2"> > <td>`, "1 of 1 checks satisfied"}},
		{"bytes added after </body>",
			replaceOnce(t, page, "</body>\n", "</body>\n<p>Approved.</p>\n"),
			[]string{"after </body>:", "<p>Approved.</p>"}},
		{"the package hash shown on the cover changed",
			replaceOnce(t, page, "SHA-256 of the package: <code class=\"hash\">"+pkgHash, "SHA-256 of the package: <code class=\"hash\">"+forged),
			[]string{`<section class="cover"> > <p class="pkg-hash"> > <code class="hash">`, forged[:12]}},
		{"the package hash recorded on the cover changed",
			replaceOnce(t, page, `data-package-sha256="`+pkgHash, `data-package-sha256="`+forged),
			[]string{"hash: the cover states the package SHA-256 " + forged}},
		{"the recorded title block changed",
			replaceOnce(t, page, `&#34;Number&#34;:&#34;TW-PKG-01&#34;`, `&#34;Number&#34;:&#34;TW-PKG-02&#34;`),
			[]string{"in <head> > <title>"}},
		{"the record of the title block removed",
			regexp.MustCompile(`<pre hidden id="calcdoc-package"[^<]*</pre>\n`).ReplaceAllString(page, ""),
			[]string{"carries no record of its title block"}},
		{"a sheet built by another version",
			strings.Replace(page, `data-version="test"`, `data-version="0.0.9"`, -1),
			[]string{"made by calcdoc 0.0.9", "verify it with calcdoc 0.0.9"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) { mustFail(t, c.page, c.say...) })
	}
}

// The forgeries of a single sheet.
func TestVerifySheetForgeries(t *testing.T) {
	page := string(verifySheet(t, "heater.md", sheettest.HeaterDoc, "test"))
	stampRE := regexp.MustCompile(`(?s)<section class="stamp".*?</section>\n`)
	if !stampRE.MatchString(page) {
		t.Fatal("no stamp section")
	}
	cases := []struct {
		name string
		page string
		say  []string
	}{
		{"the whole stamp section removed", stampRE.ReplaceAllString(page, ""),
			[]string{"stamp: the sheet has no stamp section"}},
		{"a style in the head", replaceOnce(t, page, "</head>", "<style>.marker{display:none}</style>\n</head>"),
			[]string{"in <head>"}},
		{"a script at the end of the body", replaceOnce(t, page, "</body>", "<script>alert(1)</script></body>"),
			[]string{"script: the file holds 1 <script>", "in <body>"}},
		{"bytes after </body>", page + "<!-- approved -->",
			[]string{"after </body>: the sheet goes on", "<!-- approved -->"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) { mustFail(t, c.page, c.say...) })
	}
}

// git runs git in dir with a fixed identity; the test skips without git.
func git(t *testing.T, dir string, args ...string) string {
	t.Helper()
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git is not installed")
	}
	cmd := exec.Command("git", append([]string{"-C", dir, "-c", "user.name=Test", "-c", "user.email=test@example.invalid", "-c", "commit.gpgsign=false"}, args...)...)
	cmd.Env = append(os.Environ(), "GIT_CONFIG_GLOBAL=/dev/null", "GIT_CONFIG_NOSYSTEM=1")
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("git %v: %v\n%s", args, err, out)
	}
	return strings.TrimSpace(string(out))
}

// A sheet built from a modified file and relabelled clean (state, detail,
// words and marker all edited to agree) renders consistently from its
// record, so only git can tell: run where the source's repository is,
// verify finds that the file at the recorded commit is not the embedded
// source. The same sheet unedited passes.
func TestVerifyStateRelabelled(t *testing.T) {
	dir := t.TempDir()
	git(t, dir, "init", "-q")
	path := filepath.Join(dir, "heater.md")
	sheettest.WriteFile(t, path, sheettest.HeaterDoc)
	git(t, dir, "add", "heater.md")
	git(t, dir, "commit", "-q", "-m", "heater")
	commit := git(t, dir, "rev-parse", "HEAD")
	edited := strings.Replace(sheettest.HeaterDoc, "R = 26.45 ohm", "R = 26.5 ohm", 1)
	sheettest.WriteFile(t, path, edited)

	st := stamp.Of(path, []byte(edited))
	if st.State != stamp.Modified || st.Commit != commit {
		t.Fatalf("stamp %+v", st)
	}
	doc := calcdoc.Parse(path, []byte(edited), kind.Standard())
	build := func(st render.StampInfo) []byte {
		p, err := render.Sheet(doc, render.Options{Version: "test", Stamp: &st, EmbedSource: true})
		if err != nil {
			t.Fatal(err)
		}
		return p
	}
	opt := Options{Version: "test", Git: true}
	rep, err := Check(build(st), opt)
	if err != nil || !rep.OK() || rep.Sheets[0].Git == nil || !rep.Sheets[0].Git.Applies {
		t.Fatalf("the genuine sheet: %v %+v %+v", err, rep.Sheets[0].Differences, rep.Sheets[0].Git)
	}
	// the forger's sheet: every trace of "modified" made "clean"
	lie := st
	lie.State = stamp.Clean
	lie.Detail = strings.Replace(st.Detail, "source differs from its last commit", "source is as committed in", 1)
	forged := build(lie)
	if strings.Contains(string(forged), "NOT FOR ISSUE") {
		t.Fatal("the relabelled sheet still carries a marker")
	}
	if rep, _ := Check(forged, Options{Version: "test"}); !rep.OK() {
		t.Fatalf("without git the relabelled sheet cannot be told apart, yet it fails: %v", rep.Sheets[0].Differences)
	}
	rep, err = Check(forged, opt)
	if err != nil {
		t.Fatal(err)
	}
	if rep.OK() || len(rep.Sheets[0].Differences) != 1 || rep.Sheets[0].Differences[0].Kind != "git" ||
		!strings.Contains(rep.Sheets[0].Differences[0].Message, "the sheet says the source is clean (as committed in "+commit[:12]+"), but heater.md at that commit is SHA-256 "+stamp.Hash([]byte(sheettest.HeaterDoc))) {
		t.Fatalf("the relabelled sheet: %+v", rep.Sheets[0].Differences)
	}
	// a recorded commit that the repository does not hold
	other := st
	other.Commit = strings.Repeat("ab", 20)
	rep, _ = Check(build(other), opt)
	if rep.OK() || !strings.Contains(rep.Sheets[0].Differences[0].Message, "holds no commit "+other.Commit) {
		t.Fatalf("an unknown commit: %+v", rep.Sheets[0].Differences)
	}
	// a recorded commit date that is not the commit's
	date := st
	date.CommitDate = "2001-01-01T00:00:00Z"
	rep, _ = Check(build(date), opt)
	if rep.OK() || !strings.Contains(rep.Sheets[0].Differences[0].Message, "but the sheet records 2001-01-01T00:00:00Z") {
		t.Fatalf("a wrong date: %+v", rep.Sheets[0].Differences)
	}
}

// Every shipped example, built as build builds it (stamp.Of in this
// repository) and put together in one package, verifies, with the git
// facts checked against this repository.
func TestVerifyShippedExamples(t *testing.T) {
	paths, err := shippedExamples()
	if err != nil || len(paths) == 0 {
		t.Fatalf("no examples: %v", err)
	}
	opt := Options{Version: "test", Git: true}
	var sheets []pack.Sheet
	for _, p := range paths {
		src, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		st := stamp.Of(p, src)
		doc := calcdoc.Parse(p, src, kind.Standard())
		o := render.Options{Version: "test", Stamp: &st, EmbedSource: true}
		page, err := render.Sheet(doc, o)
		if err != nil {
			t.Fatal(err)
		}
		rep, err := Check(page, opt)
		if err != nil || !rep.OK() {
			t.Errorf("%s: %v %+v", p, err, rep.Sheets[0].Differences)
		}
		sheets = append(sheets, pack.Sheet{Doc: doc, Options: o})
	}
	page, err := pack.Package(pkgInfo, sheets, "test")
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Check(page, opt)
	if err != nil || !rep.OK() || len(rep.Sheets) != len(paths) {
		t.Fatalf("the package of the examples: %v %+v", err, rep.PackageDifferences)
	}
}
