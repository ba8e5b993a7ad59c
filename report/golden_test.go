package report

import (
	"bytes"
	"flag"
	"os"
	"path/filepath"
	"testing"
)

// Golden files of the fit writers' text view: a change of layout or
// rounding shows up as a diff. Regenerate after an intended change with
//
//	go test ./report/ -run Golden -update
var update = flag.Bool("update", false, "rewrite the golden files in testdata/report")

func golden(t *testing.T, name string, got []byte) {
	t.Helper()
	path := filepath.Join("..", "testdata", "report", name)
	if *update {
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run with -update to create it)", err)
	}
	if !bytes.Equal(got, want) {
		t.Errorf("%s changed; if intended, rerun with -update.\ngot:\n%s\nwant:\n%s", path, got, want)
	}
}

func TestGoldenFitsText(t *testing.T) {
	f, _ := threeFits(t)
	var b bytes.Buffer
	if err := f.WriteText(&b, TextOptions{}); err != nil {
		t.Fatal(err)
	}
	golden(t, "fits.txt", b.Bytes())
	b.Reset()
	if err := f.WriteText(&b, TextOptions{TempUnit: Fahrenheit, Width: 72, NoCautions: true}); err != nil {
		t.Fatal(err)
	}
	golden(t, "fits-fahrenheit-72.txt", b.Bytes())
}
