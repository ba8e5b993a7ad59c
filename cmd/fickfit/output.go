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

type writer = io.Writer

// outFlags are --format and -o, shared by every command that computes.
type outFlags struct {
	format string
	path   string
}

func (o *outFlags) register(c *cobra.Command) {
	c.Flags().StringVar(&o.format, "format", "text", "output format: text, json or csv")
	c.Flags().StringVarP(&o.path, "output", "o", "", "write to this file instead of standard output (written whole or not at all)")
}

// check validates the flags before any work is done, and refuses to write
// over an input.
func (o *outFlags) check(inputs []string) error {
	switch o.format {
	case "text", "json", "csv":
	default:
		return usagef("--format %q: use text, json or csv", o.format)
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

// write sends the output to standard output or, with -o, to a temporary
// file in the target folder that is renamed into place when complete.
func (o *outFlags) write(c *cobra.Command, fn func(io.Writer) error) error {
	if o.path == "" {
		return fn(c.OutOrStdout())
	}
	return report.WriteFileAtomic(o.path, fn)
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
