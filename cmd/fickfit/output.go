package main

import (
	"io"
	"os"
	"path/filepath"
	"strings"
	"sync"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
	"golang.org/x/term"

	"github.com/fickfit/fickfit/profile"
	"github.com/fickfit/fickfit/report"
)

// outFlags are the output options, declared here once for every command:
// --format and -o for the commands that write one document to a stream,
// and --temperature-unit and --digits for every command that writes text
// (campaign and demo too). A new shared output option is one more field,
// flag and line in textOptions or emit below.
type outFlags struct {
	stream   bool // the command writes a Document to standard output or -o
	format   string
	path     string
	tempUnit string
	digits   int

	cmd    *cobra.Command
	fmt    report.Format
	unit   report.TempUnit
	inputs []string // every input file and folder (check)
}

// register declares the flags on c; stream says whether c writes one
// document (--format, -o) or a report folder (campaign, demo).
func (o *outFlags) register(c *cobra.Command, stream bool) {
	o.stream = stream
	o.cmd = c
	fl := c.Flags()
	if stream {
		fl.StringVar(&o.format, "format", "text", "output format: "+joinOr(report.FormatNames())+"; when not given, -o FILE.json, FILE.csv or FILE.txt chooses it")
		fl.StringVarP(&o.path, "output", "o", "", "write to this file instead of standard output (written whole or not at all; never an input, a folder or a device; - is standard output)")
		_ = c.RegisterFlagCompletionFunc("format", fixed(report.FormatNames()...))
		markOutput(c, "output")
	}
	fl.StringVar(&o.tempUnit, "temperature-unit", "C", "temperature unit of the text and reports: C, K or F")
	fl.IntVar(&o.digits, "digits", report.DefaultDigits, "significant digits of the numbers text writes without an interval (1 to 15; a value with an interval keeps the digits its interval supports)")
	_ = c.RegisterFlagCompletionFunc("temperature-unit", fixed("C", "K", "F"))
}

// check validates the flags before any work is done, and refuses to write
// over an input: args and every file named by another flag (calibrations,
// logs, tables), folders with the files in them, compared by identity.
func (o *outFlags) check(args []string) error {
	u, err := report.ParseTempUnit(o.tempUnit)
	if err != nil {
		return usagef("--temperature-unit: %v", err)
	}
	o.unit = u
	if o.digits < 1 || o.digits > 15 {
		return usagef("--digits %d: give 1 to 15 significant digits", o.digits)
	}
	o.inputs = inputFiles(o.cmd, args)
	if !o.stream {
		return nil
	}
	if o.fmt, err = report.ParseFormat(o.format); err != nil {
		return usagef("--format: %v", err)
	}
	if f, ok := report.FormatOfPath(o.path); ok && !o.cmd.Flags().Changed("format") {
		o.fmt = f // -o results.csv without --format: CSV, not text in a .csv file
	}
	if o.toStdout() {
		return nil
	}
	if _, err := o.output().Target(o.path); err != nil {
		return usagef("-o %v", err)
	}
	if fi, err := os.Stat(filepath.Dir(o.path)); err != nil || !fi.IsDir() {
		return usagef("-o %s: the folder %s does not exist; create it first or choose another output name", o.path, filepath.Dir(o.path))
	}
	return nil
}

// toStdout tells whether the document goes to standard output: no -o, or -o -.
func (o *outFlags) toStdout() bool { return o.path == "" || o.path == "-" }

// output is how -o (and any other file a stream command writes) is
// written: replacing an existing regular file, never an input.
func (o *outFlags) output() report.Output {
	return report.Output{Force: true, Inputs: o.inputs}
}

// outputAnnotation marks a flag that names a file or folder the command
// writes (markOutput): its value is not an input.
const outputAnnotation = "fickfit_output"

// markOutput marks the flags that name what the command writes (-o,
// --out, --figure…), so that inputFiles does not take an existing file
// they name for an input. Every such flag must be marked.
func markOutput(c *cobra.Command, names ...string) {
	for _, n := range names {
		_ = c.Flags().SetAnnotation(n, outputAnnotation, []string{"true"})
	}
}

// inputFiles lists what the command reads: the arguments and the values of
// the flags set on the command line that name existing files ("FILE:GROUP"
// too), with the files fickfit reads in every folder among them. Files it
// cannot see yet are left out: the readers report them.
func inputFiles(c *cobra.Command, args []string) []string {
	paths := append([]string{}, args...)
	if c != nil {
		c.Flags().Visit(func(f *pflag.Flag) {
			if _, out := f.Annotations[outputAnnotation]; out {
				return
			}
			values := []string{f.Value.String()}
			if sv, ok := f.Value.(pflag.SliceValue); ok {
				values = sv.GetSlice()
			}
			for _, v := range values {
				cands := []string{v}
				if i := strings.LastIndex(v, ":"); i > 1 {
					cands = append(cands, v[:i])
				}
				for _, p := range cands {
					if _, err := os.Stat(p); err == nil {
						paths = append(paths, p)
						break
					}
				}
			}
		})
	}
	var out []string
	for _, p := range paths {
		out = append(out, p)
		if fi, err := os.Stat(p); err == nil && fi.IsDir() {
			files, _ := profile.Files([]string{p})
			out = append(out, files...)
		}
	}
	return out
}

// textOptions are the options of the text form.
func (o *outFlags) textOptions() report.TextOptions {
	return report.TextOptions{TempUnit: o.unit, Digits: o.digits}
}

// emit writes d in the chosen format to standard output or, with -o, to a
// temporary file in the target folder that is renamed into place when
// complete. check must have been called.
func (o *outFlags) emit(c *cobra.Command, d report.Document) error {
	write := func(w io.Writer) error { return emit(w, o.fmt, o.textOptions(), d) }
	if o.toStdout() {
		return write(c.OutOrStdout())
	}
	return o.output().WriteFile(o.path, write)
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
