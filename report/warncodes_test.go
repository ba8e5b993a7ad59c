package report

import (
	"io/fs"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strings"
	"testing"
)

// TestWarningCodesListed: every warning code written anywhere in the
// module (a Warn or warn call, or a Code field, with a literal code) is
// listed in docs/warnings.md, and every code listed there is still
// written: the list users read cannot drift from the program (common
// practice, no source).
func TestWarningCodesListed(t *testing.T) {
	const root = ".."
	site := regexp.MustCompile(`(?:\b[wW]arn\(|\bCode:\s*)"([a-z0-9]+(?:-[a-z0-9]+)*)"`)
	written := map[string]string{} // code → first place
	err := filepath.WalkDir(root, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() {
			if path != root && (d.Name() == "testdata" || strings.HasPrefix(d.Name(), ".")) {
				return fs.SkipDir
			}
			return nil
		}
		if !strings.HasSuffix(path, ".go") || strings.HasSuffix(path, "_test.go") {
			return nil
		}
		b, err := os.ReadFile(path)
		if err != nil {
			return err
		}
		for _, m := range site.FindAllSubmatch(b, -1) {
			if _, ok := written[string(m[1])]; !ok {
				written[string(m[1])] = path
			}
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if len(written) < 40 {
		t.Fatalf("found only %d warning codes in the source: the pattern no longer matches how warnings are written", len(written))
	}
	doc, err := os.ReadFile(filepath.Join(root, "docs", "warnings.md"))
	if err != nil {
		t.Fatal(err)
	}
	listed := map[string]bool{}
	for _, m := range regexp.MustCompile("(?m)^\\| `([a-z0-9-]+)` \\|").FindAllSubmatch(doc, -1) {
		if listed[string(m[1])] {
			t.Errorf("docs/warnings.md lists %s twice", m[1])
		}
		listed[string(m[1])] = true
	}
	var missing, stale []string
	for c, where := range written {
		if !listed[c] {
			missing = append(missing, c+" ("+where+")")
		}
	}
	for c := range listed {
		if _, ok := written[c]; !ok {
			stale = append(stale, c)
		}
	}
	sort.Strings(missing)
	sort.Strings(stale)
	if len(missing) > 0 {
		t.Errorf("warning codes written but not listed in docs/warnings.md: %s", strings.Join(missing, ", "))
	}
	if len(stale) > 0 {
		t.Errorf("docs/warnings.md lists codes nothing writes: %s", strings.Join(stale, ", "))
	}
	t.Logf("%d warning codes written, %d listed", len(written), len(listed))
}
