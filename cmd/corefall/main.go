// Command corefall samples massive stars from an initial mass function, follows each to the
// collapse of its core, decides its remnant with published prescriptions and writes remnant
// catalogues. Run `corefall --help` for the commands.
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"

	"github.com/spf13/cobra"
)

// Exit codes.
const (
	exitOK          = 0
	exitError       = 1   // bad input or a failed run
	exitInterrupted = 130 // stopped by SIGINT or SIGTERM; no partial file is left behind
)

// app carries the streams and environment a command runs with, so tests can run commands in-process.
type app struct {
	stdout, stderr io.Writer
	environ        []string
}

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	a := &app{stdout: os.Stdout, stderr: os.Stderr, environ: os.Environ()}
	os.Exit(a.execute(ctx, os.Args[1:]))
}

// execute runs the command line args and returns the exit code.
func (a *app) execute(ctx context.Context, args []string) int {
	root := a.rootCommand()
	root.SetArgs(args)
	root.SetOut(a.stdout)
	root.SetErr(a.stderr)
	err := root.ExecuteContext(ctx)
	switch {
	case err == nil:
		return exitOK
	case errors.Is(err, context.Canceled) || ctx.Err() != nil:
		fmt.Fprintln(a.stderr, "corefall: interrupted; no catalogue was written (any previous file at the output path is untouched)")
		return exitInterrupted
	default:
		fmt.Fprintln(a.stderr, "corefall:", err)
		return exitError
	}
}

func (a *app) rootCommand() *cobra.Command {
	root := &cobra.Command{
		Use:   "corefall",
		Short: "Black holes and neutron stars from stellar collapse: population synthesis",
		Long: `corefall samples massive stars (single and in wide binaries) from an initial mass function,
follows each to the collapse of its core, decides the remnant with published prescriptions
(supernova engines, direct collapse, pair instability, natal kicks) and writes remnant
catalogues to Parquet, Arrow or CSV with full provenance.`,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.AddCommand(
		a.runCommand(),
		a.starCommand(),
		a.remnantCommand(),
		a.inspiralCommand(),
		a.inspectCommand(),
		a.ratesCommand(),
		a.plotCommand(),
		a.configCommand(),
		a.versionCommand(),
		a.sweepCommand(),
	)
	return root
}
