package report

import (
	"bytes"
	"context"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"
)

func TestHTMLSelfContained(t *testing.T) {
	res, _ := runCampaign(t, 1)
	var b bytes.Buffer
	if err := res.WriteHTML(&b, CampaignOptions{}); err != nil {
		t.Fatal(err)
	}
	s := b.String()
	// Nothing is fetched: no scripts, stylesheets, images, fonts or imports
	// from anywhere (the SVG namespace URIs are names, not fetches).
	for _, bad := range []string{"<script", "<link", "<img", "<iframe", "@import", "url(", "src=", "@font-face"} {
		if strings.Contains(s, bad) {
			t.Errorf("HTML contains %q", bad)
		}
	}
	if m := regexp.MustCompile(`href="(https?:)?//`).FindString(s); m != "" {
		t.Errorf("HTML links outside: %s", m)
	}
	for _, want := range []string{
		"<!DOCTYPE html>", "@media print", "Summary", "Arrhenius lines", "Lot comparison", "Back-calculated parts",
		"Methods and sources", "Crank", "Bates", "Efron", "Tibshirani", "Fieller",
		"Verify by metallography", "applicable specifications", "local codes", "licensed engineering judgement",
		"Audit trail", res.Inputs[0].SHA256, filepath.Base(res.Inputs[0].Name),
		`id="p-part-1"`, `href="#p-part-1"`,
	} {
		if !strings.Contains(s, want) {
			t.Errorf("HTML lacks %q", want)
		}
	}
	// Every figure is inline: profiles, Arrhenius, lots.
	if n, want := strings.Count(s, "<svg "), len(res.Results)+2; n != want {
		t.Errorf("%d inline SVG figures, want %d", n, want)
	}
	if strings.Contains(s, "<?xml") {
		t.Error("XML prelude inside HTML")
	}
}

// chromium finds a headless Chromium. Without one the browser test is
// skipped on a workstation and fails in CI (CI must install the Debian
// package "chromium").
func chromium(t *testing.T) string {
	t.Helper()
	for _, name := range []string{"chromium", "chromium-browser", "google-chrome", "google-chrome-stable"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	msg := "headless Chromium not found (install the Debian package chromium: apt-get install -y chromium)"
	if os.Getenv("CI") != "" {
		t.Fatal(msg + "; CI must provide it")
	}
	t.Skip(msg + "; skipping the browser test outside CI")
	return ""
}

type browserRun struct {
	stderr string
	dom    string
	shot   string
}

// runChromium loads page in a fresh headless Chromium profile, without
// network, and returns its log, the DOM after load and a screenshot path.
func runChromium(t *testing.T, bin, page string) browserRun {
	t.Helper()
	dir := t.TempDir()
	common := []string{"--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--disable-dev-shm-usage", "--enable-logging=stderr", "--v=0", "--window-size=1200,1800"}
	run := func(profile string, extra ...string) (stdout, stderr string) {
		ctx, cancel := context.WithTimeout(context.Background(), 120*time.Second)
		defer cancel()
		args := append(append(append([]string{}, common...), "--user-data-dir="+filepath.Join(dir, profile)), extra...)
		args = append(args, "file://"+page)
		cmd := exec.CommandContext(ctx, bin, args...)
		var o, e bytes.Buffer
		cmd.Stdout, cmd.Stderr = &o, &e
		if err := cmd.Run(); err != nil {
			t.Fatalf("chromium: %v\n%s", err, e.String())
		}
		return o.String(), e.String()
	}
	var br browserRun
	br.shot = filepath.Join(dir, "shot.png")
	_, e1 := run("p1", "--screenshot="+br.shot)
	dom, e2 := run("p2", "--dump-dom")
	br.stderr, br.dom = e1+e2, dom
	return br
}

// consoleErrors picks the page's console errors and uncaught exceptions
// from Chromium's log.
func consoleErrors(log string) []string {
	var out []string
	for _, l := range strings.Split(log, "\n") {
		if strings.Contains(l, "CONSOLE") && (strings.Contains(l, ":ERROR:") || strings.Contains(l, "Uncaught") || strings.Contains(l, "Error")) {
			out = append(out, l)
		}
		if strings.Contains(l, "Uncaught") {
			out = append(out, l)
		}
	}
	return out
}

func TestHTMLInChromium(t *testing.T) {
	bin := chromium(t)
	// The detector must see a console error when there is one.
	bad := filepath.Join(t.TempDir(), "bad.html")
	os.WriteFile(bad, []byte(`<!DOCTYPE html><html><body><p>x</p><script>console.error("deliberate"); undefinedCall();</script></body></html>`), 0o644)
	if br := runChromium(t, bin, bad); len(consoleErrors(br.stderr)) == 0 {
		t.Fatalf("console errors of a broken page were not detected; log:\n%s", br.stderr)
	}

	res, _ := runCampaign(t, 1)
	page := filepath.Join(t.TempDir(), "report.html")
	f, err := os.Create(page)
	if err != nil {
		t.Fatal(err)
	}
	if err := res.WriteHTML(f, CampaignOptions{}); err != nil {
		t.Fatal(err)
	}
	f.Close()
	br := runChromium(t, bin, page)
	if errs := consoleErrors(br.stderr); len(errs) > 0 {
		t.Errorf("console errors:\n%s", strings.Join(errs, "\n"))
	}
	for _, want := range []string{"Diffusion campaign report", "Audit trail", "Back-calculated parts"} {
		if !strings.Contains(br.dom, want) {
			t.Errorf("rendered DOM lacks %q", want)
		}
	}
	if n := strings.Count(br.dom, "<svg "); n != len(res.Results)+2 {
		t.Errorf("rendered DOM has %d SVG figures, want %d", n, len(res.Results)+2)
	}
	fh, err := os.Open(br.shot)
	if err != nil {
		t.Fatal(err)
	}
	defer fh.Close()
	img, err := png.Decode(fh)
	if err != nil {
		t.Fatal(err)
	}
	if frac, colours := inked(img); frac < 0.02 || colours < 50 {
		t.Errorf("screenshot looks blank: %.3f inked, %d colours", frac, colours)
	}
}
