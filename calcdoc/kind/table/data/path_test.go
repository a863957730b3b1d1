package data

import (
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

// repo makes a folder standing for a repository:
//
//	root/.git/
//	root/calcs/feeder.md
//	root/calcs/data/cu.csv
//	root/shared/al.csv
//	outside/secret.csv       (beside root, not in it)
func repo(t *testing.T) (root, doc, outside string) {
	t.Helper()
	base := t.TempDir()
	root = filepath.Join(base, "root")
	outside = filepath.Join(base, "outside")
	for _, d := range []string{".git", "calcs/data", "shared"} {
		if err := os.MkdirAll(filepath.Join(root, d), 0o755); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.MkdirAll(outside, 0o755); err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{filepath.Join(root, "calcs/feeder.md"), filepath.Join(root, "calcs/data/cu.csv"), filepath.Join(root, "shared/al.csv"), filepath.Join(outside, "secret.csv")} {
		if err := os.WriteFile(f, []byte("S,R\n1,2\n"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return root, filepath.Join(root, "calcs", "feeder.md"), outside
}

func TestResolveInside(t *testing.T) {
	root, doc, _ := repo(t)
	realRoot, _ := filepath.EvalSymlinks(root)
	for _, c := range []struct{ rel, want string }{
		{"data/cu.csv", "calcs/data/cu.csv"},
		{"./data/cu.csv", "calcs/data/cu.csv"},
		{"../shared/al.csv", "shared/al.csv"},         // up, but still inside
		{`data\cu.csv`, "calcs/data/cu.csv"},          // Windows separators
		{`..\shared\al.csv`, "shared/al.csv"},         // Windows, up and inside
		{"../../root/shared/al.csv", "shared/al.csv"}, // out by name and back in
		{"data/../data/cu.csv", "calcs/data/cu.csv"},  // .. inside the path
	} {
		got, err := ResolveInside(doc, c.rel, root)
		if err != nil {
			t.Errorf("%s: %v", c.rel, err)
			continue
		}
		if want := filepath.Join(realRoot, filepath.FromSlash(c.want)); got != want {
			t.Errorf("%s: %s, want %s", c.rel, got, want)
		}
	}
}

func TestResolveInsideRefuses(t *testing.T) {
	root, doc, _ := repo(t)
	for _, c := range []struct{ rel, want string }{
		{"../../outside/secret.csv", "leads out of"},
		{`..\..\outside\secret.csv`, "leads out of"},
		{"../../../../../../../../etc/passwd", ""}, // out (or no such file): refused either way
		{"/etc/passwd", "is an absolute path"},
		{`C:\data\cu.csv`, "is an absolute path"},
		{"C:/data/cu.csv", "is an absolute path"},
		{`\\server\share\cu.csv`, "is an absolute path"},
		{"data/missing.csv", "no such file"},
		{"data", "is a folder, not a file"},
		{"", "no path given"},
	} {
		_, err := ResolveInside(doc, c.rel, root)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: error %v, want %q", c.rel, err, c.want)
		}
	}
}

// A symbolic link inside the repository that points out of it is
// refused; one that points to a file inside is followed.
func TestResolveInsideSymlinks(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("symbolic links need privileges on Windows")
	}
	root, doc, outside := repo(t)
	data := filepath.Join(root, "calcs", "data")
	if err := os.Symlink(filepath.Join(outside, "secret.csv"), filepath.Join(data, "link-out.csv")); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(outside, filepath.Join(data, "dir-out")); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink("../../shared/al.csv", filepath.Join(data, "link-in.csv")); err != nil {
		t.Fatal(err)
	}
	for _, rel := range []string{"data/link-out.csv", "data/dir-out/secret.csv"} {
		if _, err := ResolveInside(doc, rel, root); err == nil || !strings.Contains(err.Error(), "leads out of") {
			t.Errorf("%s: error %v, want it refused", rel, err)
		}
	}
	got, err := ResolveInside(doc, "data/link-in.csv", root)
	realRoot, _ := filepath.EvalSymlinks(root)
	if err != nil || got != filepath.Join(realRoot, "shared", "al.csv") {
		t.Errorf("link-in: %s %v", got, err)
	}
	// the root itself reached through a link: the rule holds on real paths
	link := filepath.Join(filepath.Dir(root), "root-link")
	if err := os.Symlink(root, link); err != nil {
		t.Fatal(err)
	}
	if _, err := ResolveInside(filepath.Join(link, "calcs", "feeder.md"), "data/cu.csv", link); err != nil {
		t.Errorf("through a linked root: %v", err)
	}
	if _, err := ResolveInside(filepath.Join(link, "calcs", "feeder.md"), "../../outside/secret.csv", link); err == nil {
		t.Error("through a linked root, a path out was allowed")
	}
}

func TestFindRoot(t *testing.T) {
	root, doc, outside := repo(t)
	if got := FindRoot(doc, "fallback"); got != root {
		t.Errorf("FindRoot = %s, want %s", got, root)
	}
	// outside git: the folder given on the command line (unless the
	// temporary folder itself lies in a repository)
	for d := outside; ; d = filepath.Dir(d) {
		if _, err := os.Lstat(filepath.Join(d, ".git")); err == nil {
			t.Skipf("%s is inside the repository %s", outside, d)
		}
		if filepath.Dir(d) == d {
			break
		}
	}
	if got := FindRoot(filepath.Join(outside, "x.md"), "the-folder-given"); got != "the-folder-given" {
		t.Errorf("FindRoot outside git = %s", got)
	}
}
