package main

import (
	"io"
	"os"
	"path/filepath"
	"sync"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/cobra"
	"golang.org/x/term"

	"github.com/fickfit/fickfit/report"
)

// outFlags are the output options, declared here once for every command:
// --format and -o for the commands that write one document to a stream,
// and --temperature-unit for every command that writes text (campaign and
// demo too). A new shared output option is one more field, flag and line
// in textOptions or emit below.
type outFlags struct {
	stream   bool // the command writes a Document to standard output or -o
	format   string
	path     string
	tempUnit string

	fmt  report.Format
	unit report.TempUnit
}

// register declares the flags on c; stream says whether c writes one
// document (--format, -o) or a report folder (campaign, demo).
func (o *outFlags) register(c *cobra.Command, stream bool) {
	o.stream = stream
	fl := c.Flags()
	if stream {
		fl.StringVar(&o.format, "format", "text", "output format: "+joinOr(report.FormatNames()))
		fl.StringVarP(&o.path, "output", "o", "", "write to this file instead of standard output (written whole or not at all)")
		_ = c.RegisterFlagCompletionFunc("format", fixed(report.FormatNames()...))
	}
	fl.StringVar(&o.tempUnit, "temperature-unit", "C", "temperature unit of the text and reports: C, K or F")
	_ = c.RegisterFlagCompletionFunc("temperature-unit", fixed("C", "K", "F"))
}

// check validates the flags before any work is done, and refuses to write
// over an input.
func (o *outFlags) check(inputs []string) error {
	u, err := report.ParseTempUnit(o.tempUnit)
	if err != nil {
		return usagef("--temperature-unit: %v", err)
	}
	o.unit = u
	if !o.stream {
		return nil
	}
	if o.fmt, err = report.ParseFormat(o.format); err != nil {
		return usagef("--format: %v", err)
	}
	if o.path == "" {
		return nil
	}
	out, err := filepath.Abs(o.path)
	if err != nil {
		return usagef("-o %s: %v", o.path, err)
	}
	for _, in := range inputs {
		if a, err := filepath.Abs(in); err == nil && a == out {
			return usagef("-o %s would overwrite an input file; choose another name", o.path)
		}
	}
	return nil
}

// textOptions are the options of the text form.
func (o *outFlags) textOptions() report.TextOptions {
	return report.TextOptions{TempUnit: o.unit}
}

// emit writes d in the chosen format to standard output or, with -o, to a
// temporary file in the target folder that is renamed into place when
// complete. check must have been called.
func (o *outFlags) emit(c *cobra.Command, d report.Document) error {
	write := func(w io.Writer) error { return emit(w, o.fmt, o.textOptions(), d) }
	if o.path == "" {
		return write(c.OutOrStdout())
	}
	return report.WriteFileAtomic(o.path, write)
}

// emit writes one document in one format: the single place where a
// command's result meets a writer.
func emit(w io.Writer, f report.Format, to report.TextOptions, d report.Document) error {
	return report.Write(w, f, d, to)
}

// fixed completes a flag with a fixed list of values and no file names.
func fixed(values ...string) func(*cobra.Command, []string, string) ([]cobra.Completion, cobra.ShellCompDirective) {
	return cobra.FixedCompletions(values, cobra.ShellCompDirectiveNoFileComp)
}

// joinOr writes "a, b or c".
func joinOr(names []string) string {
	switch len(names) {
	case 0:
		return ""
	case 1:
		return names[0]
	}
	s := names[0]
	for _, n := range names[1 : len(names)-1] {
		s += ", " + n
	}
	return s + " or " + names[len(names)-1]
}

// progress returns a callback drawing a progress bar on standard error when
// it is a terminal, and nil (no bar, no cost) otherwise.
func progress(c *cobra.Command, label string, jobs int) func(done, total int) {
	if !term.IsTerminal(int(os.Stderr.Fd())) {
		return nil
	}
	var bar *progressbar.ProgressBar
	var mu sync.Mutex
	return func(done, total int) {
		mu.Lock()
		defer mu.Unlock()
		if bar == nil {
			bar = progressbar.NewOptions(total*jobs, progressbar.OptionSetWriter(os.Stderr),
				progressbar.OptionSetDescription(label), progressbar.OptionClearOnFinish(),
				progressbar.OptionThrottle(100_000_000))
		}
		_ = bar.Add(1)
	}
}
