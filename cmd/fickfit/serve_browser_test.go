package main

import (
	"bytes"
	"context"
	"encoding/json"
	"image"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/browser"
	"github.com/chromedp/cdproto/cdp"
	cdplog "github.com/chromedp/cdproto/log"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"

	"github.com/fickfit/fickfit"
	"github.com/fickfit/fickfit/serve"
)

// chromiumPath finds Debian's chromium. Without it the browser tests fail
// in CI (CI=true: CI installs the package) and are skipped elsewhere.
func chromiumPath(t *testing.T) string {
	t.Helper()
	for _, name := range []string{"chromium", "chromium-browser"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	msg := "chromium not found (Debian package chromium: apt-get install -y chromium)"
	if os.Getenv("CI") == "true" {
		t.Fatal(msg + "; CI must install it")
	}
	t.Skip(msg + "; skipping the browser tests outside CI")
	return ""
}

// workbench starts a server on loopback with the given inputs and
// returns its URL; it stops with the test.
func workbench(t *testing.T, inputs ...string) (*serve.Server, string) {
	t.Helper()
	s, err := serve.New(serve.Options{Inputs: inputs, Version: fickfit.Version})
	if err != nil {
		t.Fatal(err)
	}
	ln, err := s.Listen("127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	go s.Serve(ln)
	t.Cleanup(func() { ln.Close(); s.Close() })
	return s, s.URL(ln)
}

// browserRun is a headless chromium with a fresh profile that records
// the page's errors (exceptions, console errors, CSP violations).
type browserRun struct {
	ctx  context.Context
	mu   sync.Mutex
	errs []string
	dl   string // download folder
}

func newBrowser(t *testing.T) *browserRun {
	t.Helper()
	bin := chromiumPath(t)
	opts := []chromedp.ExecAllocatorOption{
		chromedp.ExecPath(bin),
		chromedp.Flag("headless", true), chromedp.Flag("no-sandbox", true), chromedp.Flag("disable-gpu", true),
		chromedp.Flag("disable-quic", true), chromedp.Flag("no-first-run", true),
		chromedp.Flag("disable-background-networking", true), chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true), chromedp.Flag("disable-dev-shm-usage", true),
		chromedp.UserDataDir(t.TempDir()), chromedp.WindowSize(1400, 900),
	}
	actx, cancelA := chromedp.NewExecAllocator(context.Background(), opts...)
	ctx, cancelB := chromedp.NewContext(actx)
	ctx, cancelC := context.WithTimeout(ctx, 150*time.Second)
	t.Cleanup(func() { cancelC(); cancelB(); cancelA() })
	b := &browserRun{ctx: ctx, dl: t.TempDir()}
	err := chromedp.Listen(ctx, func(ev any) {
		var msg string
		switch e := ev.(type) {
		case *runtime.EventExceptionThrown:
			msg = "exception: " + e.ExceptionDetails.Text
			if e.ExceptionDetails.Exception != nil {
				msg += " " + e.ExceptionDetails.Exception.Description
			}
		case *runtime.EventConsoleAPICalled:
			if e.Type == runtime.ConsoleAPICalledTypeError {
				msg = "console.error"
				for _, a := range e.Args {
					msg += " " + string(a.Value) + a.Description
				}
			}
		case *cdplog.EventEntryAdded:
			if e.Entry.Level == cdplog.EntryLevelError {
				msg = "log: " + e.Entry.Text + " " + e.Entry.URL
			}
		}
		if msg != "" {
			b.mu.Lock()
			b.errs = append(b.errs, msg)
			b.mu.Unlock()
		}
	})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := chromedp.Call(ctx, cdplog.Enable, cdp.Empty{}); err != nil {
		t.Fatal(err)
	}
	if _, err := chromedp.CallBrowser(ctx, browser.SetDownloadBehavior, browser.SetDownloadBehaviorParams{
		Behavior: browser.SetDownloadBehaviorBehaviorAllow, DownloadPath: b.dl}); err != nil {
		t.Fatal(err)
	}
	return b
}

// do runs actions that return nothing, in order.
func (b *browserRun) do(t *testing.T, what string, actions ...chromedp.Action[chromedp.Void]) {
	t.Helper()
	if err := chromedp.Do(b.ctx, actions...); err != nil {
		t.Fatalf("%s: %v", what, err)
	}
}

// wait polls a JavaScript condition until it holds.
func (b *browserRun) wait(t *testing.T, cond string) {
	t.Helper()
	if _, err := chromedp.Run(b.ctx, chromedp.Poll[bool](cond, chromedp.WithPollingTimeout(60*time.Second))); err != nil {
		b.shot(t, "failed")
		t.Fatalf("waiting for %s: %v; page errors: %v", cond, err, b.pageErrors())
	}
}

// attr and text read in one step in the page (a node the page redraws
// between a query and a read cannot go missing).
func (b *browserRun) attr(t *testing.T, sel, name string) string {
	t.Helper()
	return b.js(t, `document.querySelector(`+jsString(sel)+`).getAttribute(`+jsString(name)+`)`)
}

func (b *browserRun) text(t *testing.T, sel string) string {
	t.Helper()
	return b.js(t, `document.querySelector(`+jsString(sel)+`).innerText`)
}

func (b *browserRun) js(t *testing.T, expr string) string {
	t.Helper()
	v, err := chromedp.Run(b.ctx, chromedp.Evaluate[string](expr))
	if err != nil {
		t.Fatalf("%s: %v", expr, err)
	}
	return v
}

func jsString(s string) string {
	b, _ := json.Marshal(s)
	return string(b)
}

func evalInt(t *testing.T, b *browserRun, expr string) int {
	t.Helper()
	v, err := chromedp.Run(b.ctx, chromedp.Evaluate[int](expr))
	if err != nil {
		t.Fatalf("%s: %v", expr, err)
	}
	return v
}

func click(sel string) chromedp.Action[chromedp.Void] { return chromedp.Click(chromedp.CSS(sel)) }

func visible(sel string) chromedp.Action[chromedp.Void] {
	return chromedp.WaitVisible(chromedp.CSS(sel))
}

// pageErrors returns the page's errors so far, expected ones (a refused
// request a test makes on purpose) left out.
func (b *browserRun) pageErrors(expected ...string) []string {
	b.mu.Lock()
	defer b.mu.Unlock()
	var out []string
next:
	for _, e := range b.errs {
		for _, x := range expected {
			if strings.Contains(e, x) {
				continue next
			}
		}
		out = append(out, e)
	}
	return out
}

// shot takes a screenshot, checks it is not blank and keeps it in
// $FICKFIT_SHOTS when set (for people to look at).
func (b *browserRun) shot(t *testing.T, name string) {
	t.Helper()
	buf, err := chromedp.Run(b.ctx, chromedp.CaptureScreenshot())
	if err != nil {
		t.Fatalf("screenshot %s: %v", name, err)
	}
	img, err := png.Decode(bytes.NewReader(buf))
	if err != nil {
		t.Fatalf("screenshot %s: %v", name, err)
	}
	if frac, colours := inked(img); frac < 0.05 || colours < 12 {
		t.Errorf("screenshot %s looks blank: %.1f %% of pixels differ from the background, %d colours", name, 100*frac, colours)
	}
	if dir := os.Getenv("FICKFIT_SHOTS"); dir != "" {
		os.WriteFile(filepath.Join(dir, name+".png"), buf, 0o644)
	}
}

// inked returns the fraction of pixels unlike the most common colour and
// the number of distinct colours (sampled on a grid).
func inked(img image.Image) (float64, int) {
	count := map[uint32]int{}
	n := 0
	r := img.Bounds()
	for y := r.Min.Y; y < r.Max.Y; y += 3 {
		for x := r.Min.X; x < r.Max.X; x += 3 {
			cr, cg, cb, _ := img.At(x, y).RGBA()
			count[(cr>>8)<<16|(cg>>8)<<8|cb>>8]++
			n++
		}
	}
	most := 0
	for _, c := range count {
		most = max(most, c)
	}
	return float64(n-most) / float64(n), len(count)
}

// cliD fits one file on the command line (with extra flags) and returns
// D exactly as `fickfit fit --format json` writes it.
func cliD(t *testing.T, args ...string) float64 {
	t.Helper()
	code, out, errs := runCLI(t, append([]string{"fit", "--format", "json"}, args...)...)
	if code != 0 {
		t.Fatalf("fickfit fit %v: exit %d: %s", args, code, errs)
	}
	var doc struct {
		Fits []struct {
			Params []struct {
				Name  string          `json:"name"`
				Value json.RawMessage `json:"value"`
			} `json:"params"`
		} `json:"fits"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil || len(doc.Fits) != 1 {
		t.Fatalf("fit output: %v", err)
	}
	for _, p := range doc.Fits[0].Params {
		if p.Name == "D" {
			v, err := strconv.ParseFloat(string(p.Value), 64)
			if err != nil {
				t.Fatal(err)
			}
			return v
		}
	}
	t.Fatal("no D in the fit")
	return 0
}

func pageD(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("D on the page %q: %v", s, err)
	}
	return v
}

// TestWorkbenchInBrowser drives the page in chromium as a lab user would
// (common practice, no source): load the demo files with the file picker,
// read D of a named profile off the table and compare it with the command
// line to the last digit; open the profile, click its surface point out,
// see D change; save the exclusions and get the same D from
// `fickfit fit --exclude`; leave a coupon out of the Arrhenius line;
// back-calculate the pinion; export the report folder and open it.
func TestWorkbenchInBrowser(t *testing.T) {
	b := newBrowser(t)
	_, url := workbench(t)
	demo, _ := filepath.Abs("../../testdata/demo")
	var files []string
	for _, d := range []string{"coupons", "unknown"} {
		m, _ := filepath.Glob(filepath.Join(demo, d, "*.csv"))
		files = append(files, m...)
	}
	files = append(files, filepath.Join(demo, "lims-export-BAR-2307.csv"))

	const id = "F7-2291-880-1"
	coupon := filepath.Join(demo, "coupons", id+".csv")
	row := `#rows [data-id="` + id + `"]`
	b.do(t, "load the demo files",
		chromedp.Navigate(url), visible(`#drop`), chromedp.SetUploadFiles(chromedp.CSS(`#pick`), files))
	b.wait(t, `document.querySelector("#f-count").textContent.startsWith("25 of 25") &&
		document.querySelector("#progress .label").textContent === "25 profiles fitted" &&
		!!document.querySelector('`+row+` .d').dataset.d`)
	dTable := b.attr(t, row+` .d`, "data-d")
	b.shot(t, "1-table")
	d0 := cliD(t, coupon)
	if got := pageD(t, dTable); got != d0 {
		t.Errorf("D of %s: page %v, fickfit fit %v", id, got, d0)
	}

	// One profile: click the surface point out with a reason.
	point := `#p-plot g.point[data-index="0"]`
	b.do(t, "open the profile", click(row), visible(point+` circle.hit`))
	before := b.attr(t, `#p-d .v`, "data-d")
	b.do(t, "exclude a point", chromedp.SendKeys(chromedp.CSS(`#p-reason`), "oxide layer at the surface"), click(point+` circle.hit`))
	b.wait(t, `document.querySelector('`+point+`').classList.contains("excluded")`)
	after := b.attr(t, `#p-d .v`, "data-d")
	b.shot(t, "2-profile")
	if pageD(t, before) != d0 {
		t.Errorf("D in the profile view %s, in the table %v", before, d0)
	}
	d1 := pageD(t, after)
	if d1 == d0 {
		t.Errorf("D did not change when the surface point was excluded (%v)", d1)
	}

	// Save the exclusions (a download) and reproduce D on the command line.
	b.do(t, "save the exclusions", click(`#ex-save`))
	exFile := filepath.Join(b.dl, "exclusions.csv")
	waitFile(t, exFile)
	raw, _ := os.ReadFile(exFile)
	if !strings.Contains(string(raw), id+".csv,"+id+",50,9,oxide layer at the surface") {
		t.Errorf("exclusions file:\n%s", raw)
	}
	if got := cliD(t, coupon, "--exclude", exFile); got != d1 {
		t.Errorf("D with the point excluded: page %v, fickfit fit --exclude %v", d1, got)
	}

	// Arrhenius: leave a coupon of lot BAR-2307 out of its line.
	count := `document.querySelectorAll("#a-plot .apoint:not(.excluded)").length`
	target := `#a-plot .apoint[data-id="F7-2307-940-2"]`
	b.do(t, "open the Arrhenius tab", click(`.tabs button[data-tab="arrhenius"]`), visible(target+` circle.hit`))
	nBefore := evalInt(t, b, count)
	b.do(t, "leave a point out", click(target+` circle.hit`), visible(`#a-plot .apoint.excluded[data-id="F7-2307-940-2"]`))
	nAfter := evalInt(t, b, count)
	b.shot(t, "3-arrhenius")
	if nAfter != nBefore-1 {
		t.Errorf("points on the lines: %d before, %d after leaving one out", nBefore, nAfter)
	}

	// Back-calculation of the pinion from its lot's line.
	b.do(t, "open the back-calculation", click(`.tabs button[data-tab="backcalc"]`))
	b.wait(t, `document.querySelector("#b-id").value === "pinion-7731"`)
	b.do(t, "back-calculate", click(`#b-go`), visible(`#b-result`))
	result := b.text(t, `#b-result`)
	b.shot(t, "4-backcalc")
	if !strings.Contains(result, "T = ") || !strings.Contains(result, "°C") {
		t.Errorf("back-calculation: %q", result)
	}

	// Export the report folder and open it.
	out := filepath.Join(t.TempDir(), "report")
	b.do(t, "export", click(`.tabs button[data-tab="export"]`), chromedp.SendKeys(chromedp.CSS(`#e-folder`), out),
		click(`#e-go`), visible(`#e-done`))
	for _, f := range []string{"report.html", "results.json", "results.xlsx", "exclusions.csv", "figures/arrhenius.svg"} {
		if _, err := os.Stat(filepath.Join(out, f)); err != nil {
			t.Errorf("the export lacks %s", f)
		}
	}
	b.do(t, "open the report", chromedp.Navigate("file://"+filepath.Join(out, "report.html")), visible(`#audit`))
	audit := b.text(t, `#audit`)
	b.shot(t, "5-report")
	for _, want := range []string{"oxide layer at the surface", id + ".csv:9", "exclusions.csv"} {
		if !strings.Contains(audit, want) {
			t.Errorf("the report's audit trail lacks %q", want)
		}
	}

	// No token, no page.
	b.do(t, "without the token", chromedp.Navigate(strings.Split(url, "/s/")[0]+"/"))
	if body := b.text(t, `body`); strings.Contains(body, "workbench") || !strings.Contains(body, "forbidden") {
		t.Errorf("the page without the token shows %q", body)
	}
	if errs := b.pageErrors("403"); len(errs) > 0 {
		t.Errorf("the page logged errors:\n%s", strings.Join(errs, "\n"))
	}
}

// waitFile waits for a download to finish.
func waitFile(t *testing.T, path string) {
	t.Helper()
	for i := 0; i < 100; i++ {
		if fi, err := os.Stat(path); err == nil && fi.Size() > 0 {
			return
		}
		time.Sleep(100 * time.Millisecond)
	}
	t.Fatalf("%s was not downloaded", path)
}

// TestWorkbenchLoadsFoldersGivenOnTheCommandLine checks that files given
// to `fickfit serve` are listed, and a bad file shows its error beside it
// while the others load.
func TestWorkbenchLoadsFoldersGivenOnTheCommandLine(t *testing.T) {
	b := newBrowser(t)
	bad := filepath.Join(t.TempDir(), "bad.csv")
	os.WriteFile(bad, []byte("depth_mm,C_wt%\n0.1,0.8\n0.2,x\n"), 0o644)
	_, url := workbench(t, "../../testdata/demo/coupons", bad)
	b.do(t, "load", chromedp.Navigate(url))
	b.wait(t, `document.querySelector("#f-count").textContent.startsWith("12 of 12")`)
	errText := b.text(t, `#files .error`)
	if want := bad + `:3: column "C_wt%": "x" is not a number`; !strings.Contains(errText, want) {
		t.Errorf("error beside the file: %q, want %q", errText, want)
	}
	b.shot(t, "6-file-error")
	// Settings for every profile: auto model selection and a case depth.
	b.do(t, "change the settings",
		chromedp.SetValue(chromedp.CSS(`#s-model`), "auto"),
		chromedp.SendKeys(chromedp.CSS(`#s-case`), "0.35wt%"),
		click(`#s-apply`))
	b.wait(t, `document.querySelector("#command").textContent.includes("--model auto --case-threshold 0.35wt%")`)
	b.do(t, "open a profile", click(`#rows [data-id="F7-2291-940-1"]`), visible(`#p-plot g.point`))
	b.wait(t, `document.querySelector("#p-extra").textContent.includes("case depth at 0.35wt%")`)
	b.shot(t, "7-auto")

	// Files dropped on the page: a profile, then an exclusions file for it.
	drop := func(name, content string) chromedp.Action[chromedp.Void] {
		js, _ := json.Marshal([]string{name, content})
		return chromedp.Evaluate[chromedp.Void](`(() => { const [n, c] = ` + string(js) + `; const dt = new DataTransfer();
			dt.items.add(new File([c], n, { type: "text/csv" }));
			document.querySelector("#drop").dispatchEvent(new DragEvent("drop", { dataTransfer: dt, bubbles: true, cancelable: true })); })()`)
	}
	b.do(t, "drop a profile", drop("dropped.csv", "# id: DROP-1\n# temperature: 900 C\n# time: 4 h\ndepth_mm,C_wt%\n0.05,0.88\n0.1,0.80\n0.2,0.66\n0.3,0.52\n0.4,0.42\n0.6,0.30\n0.8,0.24\n1.0,0.21\n"))
	b.wait(t, `[...document.querySelectorAll("#files li")].some((li) => li.textContent.includes("dropped.csv") && li.textContent.includes("1 profile"))`)
	b.do(t, "drop exclusions", drop("exclusions.csv", "file,profile,depth_um,line,reason\ndropped.csv,DROP-1,100,,smeared\n"))
	b.wait(t, `document.querySelector("#ex-summary").textContent === "1 point excluded."`)
	if errs := b.pageErrors(); len(errs) > 0 {
		t.Errorf("the page logged errors:\n%s", strings.Join(errs, "\n"))
	}
}
