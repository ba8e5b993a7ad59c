package main

import (
	"fmt"
	"os"
	"os/exec"
	"os/signal"
	"runtime"
	"syscall"

	"github.com/spf13/cobra"

	"github.com/fickfit/fickfit"
	"github.com/fickfit/fickfit/serve"
)

func init() { addCommands(newServeCmd) }

func newServeCmd() *cobra.Command {
	var addr, exclude string
	var open bool
	c := &cobra.Command{
		Use:   "serve [FILE or FOLDER...]",
		Short: "Open the workbench in the browser: load files, see every fit, exclude points, export the report",
		Long: `Start a local web workbench and print its address (with the session's
token). Drop CSV or XLSX files on the page, or give them here; see every
profile's fit, click points to exclude them (with a reason), follow the
Arrhenius lines by lot, back-calculate parts, and export the same report
folder 'fickfit campaign --out' writes. The exclusions are saved as a CSV
file that 'fickfit fit', 'arrhenius', 'backcalc', 'compare' and 'campaign'
read with --exclude, giving the page's numbers.

The page needs no network: everything it uses is inside the binary. The
server listens on this computer only (127.0.0.1) unless --addr names
another address, and answers only requests that carry the session token.
Input files are never modified. Stop it with Ctrl-C.`,
		Example: `  fickfit serve coupons/ lims-export.csv --open
  fickfit serve --addr 127.0.0.1:8765 --exclude exclusions.csv coupons/`,
		RunE: func(c *cobra.Command, args []string) error {
			s, err := serve.New(serve.Options{Inputs: args, Exclusions: exclude, Version: fickfit.Version})
			if err != nil {
				return err
			}
			defer s.Close()
			ln, err := s.Listen(addr)
			if err != nil {
				return usagef("--addr %s: %v", addr, err)
			}
			url := s.URL(ln)
			w := c.OutOrStdout()
			if !s.Loopback() {
				fmt.Fprintf(c.ErrOrStderr(), "fickfit: warning: %s is reachable from other computers on the network; anyone with the link can read the loaded files and write reports on this computer\n", ln.Addr())
			}
			fmt.Fprintf(w, "fickfit workbench: %s\n(keep this link private: it carries the session token; Ctrl-C stops the server)\n", url)
			if open {
				if err := openBrowser(url); err != nil {
					fmt.Fprintf(c.ErrOrStderr(), "fickfit: could not open a browser (%v); open the link above by hand\n", err)
				}
			}
			ctx, stop := signal.NotifyContext(c.Context(), os.Interrupt, syscall.SIGTERM)
			defer stop()
			go func() { <-ctx.Done(); ln.Close() }()
			return s.Serve(ln)
		},
	}
	c.Flags().StringVar(&addr, "addr", "127.0.0.1:0", "address to listen on (port 0: a free port); an address other than loopback is reachable from the network")
	c.Flags().BoolVar(&open, "open", false, "open the page in the default browser")
	c.Flags().StringVar(&exclude, "exclude", "", "exclusions file to start from (as the page saves it)")
	return c
}

// openBrowser asks the desktop to open url.
func openBrowser(url string) error {
	var cmd *exec.Cmd
	switch runtime.GOOS {
	case "darwin":
		cmd = exec.Command("open", url)
	case "windows":
		cmd = exec.Command("rundll32", "url.dll,FileProtocolHandler", url)
	default:
		cmd = exec.Command("xdg-open", url)
	}
	return cmd.Start()
}
