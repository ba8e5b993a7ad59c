package main

import (
	"github.com/spf13/cobra"

	"github.com/fickfit/fickfit"
)

func newRoot() *cobra.Command {
	root := &cobra.Command{
		Use:   "fickfit",
		Short: "Fit diffusion coefficients to measured depth profiles, with honest uncertainty",
		Long: `fickfit reads concentration–depth or hardness–depth profiles (step-grind
spectrometry, glow-discharge, microprobe line scans, microhardness traverses),
fits solutions of Fick's second law by nonlinear least squares, and reports D
with confidence intervals. From several temperatures it estimates D0 and Q
(Arrhenius), back-calculates the temperature or time an unknown part saw,
tests whether alloy lots differ, predicts profiles and case depths for new
schedules, and writes reports another engineer can audit.

Results rest on the stated model assumptions. Verify case depths by
metallography, let the applicable specifications decide acceptance, and defer
to local codes and licensed engineering judgement.

Exit status: 0 ok, 1 the data could not give an answer (no convergence,
unidentifiable parameters), 2 bad input or usage, 3 an internal error of
fickfit (a bug; please report it), 4 with --keep-going: results written but
some inputs left out (listed), 130/143 stopped by SIGINT/SIGTERM.`,
		Version:       fickfit.Version,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		return usagef("%v (see 'fickfit %s --help')", err, c.Name())
	})
	for _, mk := range commands {
		root.AddCommand(mk())
	}
	return root
}

// commands are the constructors of the subcommands; each command's file
// adds its own in an init function, so a new command is one new file here
// (and its Document in report). Help lists them sorted by name.
var commands []func() *cobra.Command

// addCommands registers subcommand constructors.
func addCommands(mk ...func() *cobra.Command) { commands = append(commands, mk...) }
