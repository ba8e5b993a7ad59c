package main

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// TestWorkbenchResponsiveness measures the page with a 2,000-profile
// long table: load and fit, filter, scroll, and a click on a point to the
// new D on the page. It asserts nothing about time (timings depend on the
// machine); it runs only with FICKFIT_PERF=1 and logs what it measured.
func TestWorkbenchResponsiveness(t *testing.T) {
	if os.Getenv("FICKFIT_PERF") == "" {
		t.Skip("set FICKFIT_PERF=1 to measure the page with 2,000 profiles")
	}
	b := newBrowser(t)
	_, url := workbench(t)
	path := filepath.Join(t.TempDir(), "long-2000.csv")
	os.WriteFile(path, longTable2000(), 0o644)
	b.do(t, "open", chromedp.Navigate(url), visible(`#drop`))
	start := time.Now()
	b.do(t, "upload", chromedp.SetUploadFiles(chromedp.CSS(`#pick`), []string{path}))
	b.wait(t, `document.querySelector("#f-count").textContent.startsWith("2000 of 2000")`)
	listed := time.Since(start)
	b.wait(t, `document.querySelector("#progress .label").textContent === "2000 profiles fitted" && !document.querySelector("#rows .stale")`)
	fitted := time.Since(start)
	b.shot(t, "perf-table")
	ms := func(expr string) float64 {
		v, err := chromedp.Run(b.ctx, chromedp.Evaluate[float64](expr))
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	filter := ms(`(() => { const t0 = performance.now(); const s = document.querySelector("#f-lot"); s.value = "L2";
		s.dispatchEvent(new Event("change")); const t1 = performance.now(); s.value = ""; s.dispatchEvent(new Event("change")); return t1 - t0; })()`)
	sortT := ms(`(() => { const t0 = performance.now(); document.querySelector('#thead [data-key="D"]').click(); return performance.now() - t0; })()`)
	scroll := ms(`(() => { const sc = document.querySelector("#scroller"); const d = [];
		for (let i = 1; i <= 40; i++) { sc.scrollTop = i * 1500; const t0 = performance.now(); drawRows(false); void sc.offsetHeight; d.push(performance.now() - t0); }
		d.sort((a, b) => a - b); window.__steps = "median " + d[20].toFixed(1) + " ms"; return d[d.length - 1]; })()`)
	steps, _ := chromedp.Run(b.ctx, chromedp.Evaluate[string](`window.__steps`))
	dom := ms(`document.querySelectorAll("#rows .grid").length`)
	b.do(t, "open a profile", chromedp.Evaluate[chromedp.Void](`document.querySelector("#scroller").scrollTop = 0; drawRows(true); document.querySelector("#rows .grid").click()`),
		visible(`#p-plot g.point[data-index="2"]`))
	before := b.attr(t, `#p-d .v`, "data-d")
	t0 := time.Now()
	b.do(t, "click a point", click(`#p-plot g.point[data-index="2"] circle.hit`))
	b.wait(t, `document.querySelector("#p-d .v").dataset.d !== "`+before+`"`)
	refit := time.Since(t0)
	t.Logf("2,000 profiles: listed in %v, all fitted and shown in %v; filter %.1f ms, sort %.1f ms, scroll step %s, worst %.1f ms, %v rows in the DOM; click on a point → new D on the page %v",
		listed.Round(time.Millisecond), fitted.Round(time.Millisecond), filter, sortT, steps, scroll, dom, refit.Round(time.Millisecond))
}

// longTable2000 is an invented 2,000-profile long table (seeded noise).
func longTable2000() []byte {
	rng := rand.New(rand.NewPCG(7, 11))
	var b strings.Builder
	b.WriteString("specimen,lot,temperature_C,time_h,depth_mm,C_wt%\n")
	for i := 0; i < 2000; i++ {
		tc := []float64{880, 910, 940, 970}[(i/2)%4]
		D := 2.5e-5 * math.Exp(-147e3/(8.314462618*(tc+273.15)))
		for k := 0; k < 16; k++ {
			x := 0.05 + 0.1*float64(k)
			c := 0.2 + 0.75*math.Erfc(x*1e-3/(2*math.Sqrt(D*4*3600))) + 0.004*rng.NormFloat64()
			fmt.Fprintf(&b, "S%05d,%s,%g,4,%.3f,%.4f\n", i, []string{"L1", "L2"}[i%2], tc, x, c)
		}
	}
	return []byte(b.String())
}
