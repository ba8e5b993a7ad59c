package report

import (
	"bytes"
	"errors"
	"io"
	"os"
	"path"
	"path/filepath"

	"github.com/fickfit/fickfit/campaign"
	"github.com/fickfit/fickfit/internal/cleanup"
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

// renderAll draws every figure, in parallel over the available cores, as
// PNG too when png says so.
func renderAll(figs []*Figure, png func(*Figure) bool, dpi int, progress func(done, total int)) ([]renderedFigure, error) {
	out := make([]renderedFigure, len(figs))
	parallel.For(len(figs), func(i int) {
		rf := renderedFigure{fig: figs[i]}
		rf.svg, rf.err = figs[i].svgBytes()
		if rf.err == nil {
			rf.inline, rf.err = figs[i].inlineSVG()
		}
		if rf.err == nil && png(figs[i]) {
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
//	figures/        profile-<id> (see profileDetail), arrhenius and lots figures as SVG and PNG
//	.fickfit-manifest.json  what fickfit wrote (see OpenReportFolder)
//
// It opens the folder with OpenReportFolder (an earlier report is replaced
// only with opts.Force; the campaign's input files are never replaced),
// writes the report with ReportFolder.WriteCampaign and closes it. It
// returns the paths written.
func WriteCampaign(dir string, result *campaign.Result, opts CampaignOptions) ([]string, error) {
	if result == nil {
		return nil, errors.New("no campaign result to write")
	}
	var inputs []string
	for _, in := range result.Inputs {
		inputs = append(inputs, in.Name)
	}
	f, err := OpenReportFolder(dir, FolderOptions{Force: opts.Force, Command: "campaign", Inputs: inputs, Version: result.Version})
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return f.WriteCampaign(result, opts)
}

// WriteCampaign writes the campaign's report into the opened folder: every
// file is built in a temporary folder inside it and, when all are
// complete, moved into place, the earlier report's other files removed and
// the manifest written (see OpenReportFolder). On error, and when the run
// is interrupted, the folder is as it was. opts.Force is not used here (the
// folder was checked when opened). It returns the paths written.
func (f *ReportFolder) WriteCampaign(result *campaign.Result, opts CampaignOptions) ([]string, error) {
	if result == nil {
		return nil, errors.New("no campaign result to write")
	}
	res := &CampaignReport{Result: result, TempUnit: opts.TempUnit}
	fs, _ := res.makeFigures(opts)
	figs := fs.all(res)
	// PNG for the Arrhenius and lots figures; for the profiles' only when
	// every profile is shown (details).
	png := func(f *Figure) bool { return !opts.NoPNG && (fs.detail.pngFor() || f == fs.arrhenius || f == fs.lots) }
	var files []reportFile
	add := func(name string, w func(io.Writer) error) { files = append(files, reportFile{name, w}) }
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
	to := TextOptions{TempUnit: opts.TempUnit, Digits: opts.Digits}
	add(FileSummary, func(out io.Writer) error {
		w := newTextEscaper(out)
		if err := res.WriteSummary(w, TextOptions{TempUnit: opts.TempUnit, Digits: opts.Digits, NoCautions: true}); err != nil {
			return err
		}
		io.WriteString(w, "\n\nProfiles in detail\n\n")
		if err := res.fits().WriteText(w, to); err != nil {
			return err
		}
		return w.Close()
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
	var err error
	rendered, err = renderAll(figs, png, opts.DPI, func(d, t int) { opts.progress("figures", d, t) })
	if err != nil {
		return nil, err
	}
	if err := res.WriteWorkbook(&book, opts); err != nil {
		return nil, err
	}
	for _, rf := range rendered {
		add(path.Join(DirFigures, rf.fig.Name+".svg"), bytesWriter(rf.svg))
		if rf.png != nil {
			add(path.Join(DirFigures, rf.fig.Name+".png"), bytesWriter(rf.png))
		}
	}
	var folders []string
	if len(rendered) > 0 {
		folders = []string{DirFigures}
	}
	n := 0
	for i := range files {
		w := files[i].write
		files[i].write = func(out io.Writer) error {
			err := w(out)
			n++
			opts.progress("write", n, len(files))
			return err
		}
	}
	tmp, forget, built, err := f.build(files)
	if err != nil {
		return nil, err
	}
	defer func() {
		os.RemoveAll(tmp)
		forget()
	}()
	if err := cleanup.Hold(func() error { return f.commit(built, folders) }); err != nil {
		return nil, err
	}
	f.done = true
	written := make([]string, len(built))
	for i, b := range built {
		written[i] = filepath.Join(f.dir, filepath.FromSlash(b.Path))
	}
	return written, nil
}

// bytesWriter writes b.
func bytesWriter(b []byte) func(io.Writer) error {
	return func(w io.Writer) error { _, err := w.Write(b); return err }
}
