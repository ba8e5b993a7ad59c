package report

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/fickfit/fickfit/campaign"
	"github.com/fickfit/fickfit/internal/parallel"
)

// Names of the files in a campaign report folder.
const (
	FileJSON      = "results.json"
	FileCSV       = "results.csv"
	FileResiduals = "residuals.csv"
	FileArrhenius = "arrhenius.csv"
	FileBackcalc  = "backcalc.csv"
	FileSummary   = "summary.txt"
	FileWorkbook  = "results.xlsx"
	FileHTML      = "report.html"
	DirFigures    = "figures"
	// FileExclusions is the exclusions file applied (written only when
	// there is one); fickfit reads it back with --exclude.
	FileExclusions = "exclusions.csv"
)

// renderedFigure is a figure drawn as SVG (inline and standalone) and PNG.
type renderedFigure struct {
	fig    *Figure
	svg    []byte
	inline string
	png    []byte
	err    error
}

// renderAll draws every figure, in parallel over the available cores.
func renderAll(figs []*Figure, png bool, dpi int, progress func(done, total int)) ([]renderedFigure, error) {
	out := make([]renderedFigure, len(figs))
	parallel.For(len(figs), func(i int) {
		rf := renderedFigure{fig: figs[i]}
		rf.svg, rf.err = figs[i].svgBytes()
		if rf.err == nil {
			rf.inline, rf.err = figs[i].inlineSVG()
		}
		if rf.err == nil && png {
			var b bytes.Buffer
			rf.err = figs[i].WritePNG(&b, dpi)
			rf.png = b.Bytes()
		}
		out[i] = rf
	}, progress)
	for _, rf := range out {
		if rf.err != nil {
			return nil, rf.err
		}
	}
	return out, nil
}

// WriteCampaign writes the report folder dir (created if needed):
//
//	results.json    every number, for scripts (byte-identical on a rerun)
//	results.csv     one row per profile
//	residuals.csv   one row per measured point
//	arrhenius.csv   the Arrhenius lines, as fickfit arrhenius --format csv writes them
//	backcalc.csv    the parts marked unknown, as fickfit backcalc --format csv writes them
//	summary.txt     the terminal summary and every profile's block
//	results.xlsx    the workbook with native charts and the audit sheet
//	report.html     the self-contained report
//	figures/        profile-<id>, arrhenius and lots figures as SVG and PNG
//
// Every file is written to a temporary file beside it and renamed when
// complete. Existing report files are replaced only with opts.Force; an
// input file is never replaced. It returns the paths written.
func WriteCampaign(dir string, result *campaign.Result, opts CampaignOptions) ([]string, error) {
	if result == nil {
		return nil, errors.New("no campaign result to write")
	}
	res := &CampaignReport{Result: result, TempUnit: opts.TempUnit}
	if !opts.Force {
		if foreign := ForeignEntries(dir); len(foreign) > 0 {
			return nil, fmt.Errorf("%w: the report folder %s already holds %s, which an earlier report did not write; choose an empty folder or add --force", ErrExists, dir, strings.Join(foreign, ", "))
		}
	}
	figDir := filepath.Join(dir, DirFigures)
	if err := os.MkdirAll(figDir, 0o755); err != nil {
		return nil, fmt.Errorf("cannot create the report folder: %w", err)
	}
	var inputs []string
	for _, in := range res.Inputs {
		inputs = append(inputs, in.Name)
	}
	out := Output{Force: opts.Force, Inputs: inputs}

	fs, _ := res.makeFigures(opts)
	figs := fs.all(res)
	type job struct {
		path  string
		write func(io.Writer) error
	}
	var jobs []job
	add := func(name string, f func(io.Writer) error) { jobs = append(jobs, job{filepath.Join(dir, name), f}) }
	add(FileJSON, res.WriteJSON)
	add(FileCSV, res.fits().WriteCSV)
	add(FileResiduals, res.fits().WriteResidualsCSV)
	add(FileArrhenius, res.Arrhenius().WriteCSV)
	if len(res.Parts) > 0 {
		add(FileBackcalc, res.Backcalc().WriteCSV)
	}
	if res.Exclusions != nil {
		add(FileExclusions, res.Exclusions.WriteCSV)
	}
	to := TextOptions{TempUnit: opts.TempUnit}
	add(FileSummary, func(w io.Writer) error {
		if err := res.WriteSummary(w, TextOptions{TempUnit: opts.TempUnit, NoCautions: true}); err != nil {
			return err
		}
		io.WriteString(w, "\n\nProfiles in detail\n\n")
		return res.fits().WriteText(w, to)
	})
	var rendered []renderedFigure
	add(FileHTML, func(w io.Writer) error {
		for _, rf := range rendered {
			fs.svg[rf.fig.Name] = rf.inline
		}
		return res.writeHTML(w, opts, fs)
	})
	// The workbook is built before anything is written (stage "workbook"),
	// so that the stages run in order: figures, workbook, write.
	var book bytes.Buffer
	add(FileWorkbook, func(w io.Writer) error { _, err := w.Write(book.Bytes()); return err })
	for _, f := range figs {
		jobs = append(jobs, job{filepath.Join(figDir, f.Name+".svg"), nil})
		if !opts.NoPNG {
			jobs = append(jobs, job{filepath.Join(figDir, f.Name+".png"), nil})
		}
	}
	// Refuse before writing anything.
	for _, j := range jobs {
		if err := out.check(j.path); err != nil {
			return nil, err
		}
	}
	var err error
	rendered, err = renderAll(figs, !opts.NoPNG, opts.DPI, func(d, t int) { opts.progress("figures", d, t) })
	if err != nil {
		return nil, err
	}
	if err := res.WriteWorkbook(&book, opts); err != nil {
		return nil, err
	}
	byPath := map[string][]byte{}
	for _, rf := range rendered {
		byPath[filepath.Join(figDir, rf.fig.Name+".svg")] = rf.svg
		if rf.png != nil {
			byPath[filepath.Join(figDir, rf.fig.Name+".png")] = rf.png
		}
	}
	var written []string
	for i, j := range jobs {
		write := j.write
		if write == nil {
			b := byPath[j.path]
			write = func(w io.Writer) error { _, err := w.Write(b); return err }
		}
		if err := out.WriteFile(j.path, write); err != nil {
			return written, err
		}
		written = append(written, j.path)
		opts.progress("write", i+1, len(jobs))
	}
	return written, nil
}

// reportNames are the entries a campaign report folder holds.
var reportNames = map[string]bool{
	FileJSON: true, FileCSV: true, FileResiduals: true, FileArrhenius: true, FileBackcalc: true,
	FileSummary: true, FileWorkbook: true, FileHTML: true, DirFigures: true, FileExclusions: true,
}

// ForeignEntries lists (up to three) entries of dir that are not part of a
// fickfit report: a folder holding only an earlier report may be rewritten,
// anything else needs --force.
func ForeignEntries(dir string) []string {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil
	}
	var out []string
	for _, e := range entries {
		if !reportNames[e.Name()] {
			out = append(out, e.Name())
			if len(out) == 3 {
				break
			}
		}
	}
	return out
}
