package report

import (
	"bytes"
	"io"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit"
)

// writeFitsCSVReference is Fits.WriteCSV as it was written with
// encoding/csv (through newCSVWriter, which makes text cells inert) before
// the rows were formatted into a reused buffer: the reference the fast
// writer must match byte for byte (self-check).
func writeFitsCSVReference(f Fits, w io.Writer) error {
	names := paramNames(f.Results)
	var others []string
	for _, n := range names {
		if n != "D" {
			others = append(others, n)
		}
	}
	header := []string{"id", "lot", "temperature_K", "time_s", "model", "D_m2_s", "D_ci_lo", "D_ci_hi", "D_stderr", "Dt_m2", "Dt_ci_lo", "Dt_ci_hi"}
	for _, n := range others {
		c := csvParamColumns(n, f.Results)
		header = append(header, c, n+"_stderr", n+"_ci_lo", n+"_ci_hi", n+"_fixed")
	}
	header = append(header, "value_unit", "n", "dof", "rss", "rmse", "r2", "aicc", "chi2_red", "chi2_p", "runs_p", "cond",
		"ci_level", "ci_method", "covariance", "converged", "source", "material", "warnings", "error")
	depths := depthColumns(f.Results)
	for _, d := range depths {
		header = append(header, d.prefix+"_threshold", d.prefix+"_level", d.prefix+"_depth_m", d.prefix+"_depth_ci_lo_m",
			d.prefix+"_depth_ci_hi_m", d.prefix+"_depth_from_data_m")
	}
	cw := newCSVWriter(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	for _, r := range f.Results {
		row := []string{r.ID, r.Lot, csvGiven(r.Temperature), csvGiven(r.Time), r.Model}
		d := r.Param("D")
		switch {
		case d == nil:
			row = append(row, "", "", "", "", "", "", "")
		case r.Time > 0:
			row = append(row, csvNumber(d.Value), csvNumber(d.CI.Lo), csvNumber(d.CI.Hi), csvNumber(d.StdErr),
				csvNumber(d.Value*r.Time), csvNumber(d.CI.Lo*r.Time), csvNumber(d.CI.Hi*r.Time))
		default:
			row = append(row, "", "", "", "", csvNumber(d.Value), csvNumber(d.CI.Lo), csvNumber(d.CI.Hi))
		}
		for _, n := range others {
			e := r.Param(n)
			if e == nil {
				row = append(row, "", "", "", "", "")
				continue
			}
			row = append(row, csvNumber(e.Value), csvNumber(e.StdErr), csvNumber(e.CI.Lo), csvNumber(e.CI.Hi), strconv.FormatBool(e.Fixed))
		}
		s := r.Stats
		codes := make([]string, len(r.Warnings))
		for i, wn := range r.Warnings {
			codes[i] = wn.Code
		}
		row = append(row, r.ValueUnit, strconv.Itoa(s.N), strconv.Itoa(s.DOF), csvNumber(s.RSS), csvNumber(s.RMSE),
			csvNumber(s.R2), csvNumber(s.AICc), csvNumber(s.Chi2Red), csvNumber(s.Chi2P), csvNumber(s.RunsP), csvNumber(s.Cond),
			csvNumber(r.CILevel), r.CIMethod.String(), r.Covariance.String(), strconv.FormatBool(r.Converged), r.Source, r.Material,
			strings.Join(codes, ";"), "")
		for _, d := range depths {
			if e := d.of(r); e != nil {
				row = append(row, e.Threshold, csvNumber(e.Level), csvNumber(e.Depth), csvNumber(e.CI.Lo), csvNumber(e.CI.Hi), csvNumber(e.FromData))
			} else {
				row = append(row, "", "", "", "", "", "")
			}
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	for _, fl := range f.Failed {
		row := make([]string, len(header))
		row[0], row[1] = fl.ID, fl.Lot
		set := func(col, v string) {
			for i, h := range header {
				if h == col {
					row[i] = v
				}
			}
		}
		set("converged", "false")
		set("source", fl.Source)
		set("error", fl.Error)
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	for _, n := range f.NotRead {
		row := make([]string, len(header))
		row[0] = n.ID
		for i, h := range header {
			switch h {
			case "source":
				row[i] = n.where()
			case "error":
				row[i] = "not read: " + n.Reason
			}
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// randomFits builds results with every kind of cell: text that needs
// quoting (commas, quotes, line breaks, leading white space, `\.`),
// numbers that are not finite, missing time, missing parameters, several
// models, warnings and failures. Invented values, not check values.
func randomFits(rng *rand.Rand, n int) Fits {
	texts := []string{"", "A1", "a,b", `q"t`, "line\nbreak", "cr\rx", " lead", "\tlead", "\u00a0nb", `\.`, "é", "=1+2", "-3", "L 1",
		"@SUM(A1)", "+x", "-x", "\x1b[2J", "\xff", "\u202eevil"}
	nums := []float64{0, 1, -2.5, 1e-300, 1.7976931348623157e308, math.NaN(), math.Inf(1), math.Inf(-1), 3.0235525512409676e-11, 1e21, 123456789}
	txt := func() string { return texts[rng.IntN(len(texts))] }
	num := func() float64 {
		if rng.IntN(3) == 0 {
			return nums[rng.IntN(len(nums))]
		}
		return rng.NormFloat64() * math.Pow(10, float64(rng.IntN(30)-15))
	}
	models := []struct {
		name   string
		params []string
	}{{"erf", []string{"D", "Cs", "C0", "x0"}}, {"masstransfer", []string{"D", "beta", "Cp", "C0"}}, {"thinfilm", []string{"D", "M", "C0"}}, {"mine", []string{"zeta", "Cs"}}}
	var f Fits
	withCase, withDecarb := rng.IntN(2) == 0, rng.IntN(3) == 0
	for i := 0; i < n; i++ {
		m := models[rng.IntN(len(models))]
		r := &fit.Result{ID: txt(), Lot: txt(), Model: m.name, ValueUnit: txt(), Converged: rng.IntN(2) == 0,
			Temperature: num(), Source: txt(), Material: txt(), CILevel: 0.95, CIMethod: fit.CIWald, Covariance: fit.CovScaled,
			Stats: fit.Stats{N: rng.IntN(100), DOF: rng.IntN(100), RSS: num(), RMSE: num(), R2: num(), AICc: num(), Chi2Red: num(), Chi2P: num(), RunsP: num(), Cond: num()}}
		if rng.IntN(3) > 0 {
			r.Time = 3600 * float64(1+rng.IntN(8))
		}
		for _, p := range m.params {
			unit := []string{"m2/s", "m", "m/s", "wt%", "m2"}[rng.IntN(5)]
			r.Params = append(r.Params, fit.Estimate{Name: p, Value: num(), Unit: unit, StdErr: num(), CI: fit.Interval{Lo: num(), Hi: num()}, Fixed: rng.IntN(4) == 0})
		}
		for k := rng.IntN(3); k > 0; k-- {
			r.Warnings = append(r.Warnings, fit.Warning{Code: []string{"d-uncertain", "ci-open", "a,b", `"x"`}[rng.IntN(4)]})
		}
		depth := func() *fit.DepthEstimate {
			return &fit.DepthEstimate{Threshold: txt(), Level: num(), Depth: num(), CI: fit.Interval{Lo: num(), Hi: num()}, FromData: num()}
		}
		if withCase && rng.IntN(4) > 0 {
			r.CaseDepth = depth()
		}
		if withDecarb && rng.IntN(4) > 0 {
			r.DecarbDepth = depth()
		}
		f.Results = append(f.Results, r)
		if rng.IntN(6) == 0 {
			f.Failed = append(f.Failed, fit.Failure{ID: txt(), Lot: txt(), Source: txt(), Kind: fit.KindNoAnswer, Error: txt()})
		}
		if rng.IntN(10) == 0 {
			f.NotRead = append(f.NotRead, NotUsed{ID: txt(), Reason: txt()})
		}
	}
	return f
}

// TestFitsCSVMatchesEncodingCSV: the fit table is byte for byte what the
// encoding/csv writer gave, on random results (self-check).
func TestFitsCSVMatchesEncodingCSV(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 4))
	for k := 0; k < 300; k++ {
		f := randomFits(rng, 1+rng.IntN(8))
		var want, got bytes.Buffer
		if err := writeFitsCSVReference(f, &want); err != nil {
			t.Fatal(err)
		}
		if err := f.WriteCSV(&got); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got.Bytes(), want.Bytes()) {
			t.Fatalf("case %d differs:\n got  %q\n want %q", k, got.String(), want.String())
		}
	}
}
