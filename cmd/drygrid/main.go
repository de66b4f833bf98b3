// Command drygrid turns per-station precipitation indices into drought map
// layers: an interpolated index raster, a classified band raster, vector
// layers, a picture, a web page and area-in-drought statistics per region.
//
// This package is wiring only: cobra's flags and job files become a
// pipeline.Job, pipeline.Run runs it, and the command reports progress on a
// terminal, prints the closing summary and maps errors to exit codes (0 ok,
// 1 a data or run error, 2 a usage error: usageError here, or an error
// wrapping pipeline.ErrUsage). The run itself, from reading the stations to
// publishing the output directory, is in package pipeline.
package main

import (
	"errors"
	"fmt"
	"os"

	"github.com/spf13/cobra"

	"drygrid/pipeline"
)

// Exit codes: 0 ok, 1 data or run error, 2 usage.
const (
	exitOK    = 0
	exitData  = 1
	exitUsage = 2
)

// usageError marks an error in how the command was called (exit code 2).
type usageError struct{ err error }

func (e usageError) Error() string { return e.err.Error() }
func (e usageError) Unwrap() error { return e.err }

// asUsage marks the usage errors of package pipeline (pipeline.ErrUsage)
// as usageError; other errors pass unchanged.
func asUsage(err error) error {
	if err != nil && errors.Is(err, pipeline.ErrUsage) {
		return usageError{err}
	}
	return err
}

// usagef builds a usage error.
func usagef(format string, a ...any) error { return usageError{fmt.Errorf(format, a...)} }

// version is set at build time with -ldflags "-X main.version=...".
var version = "0.1.0-dev"

func newRootCmd() *cobra.Command {
	root := &cobra.Command{
		Use:   "drygrid",
		Short: "Drought maps from station precipitation indices",
		Long: `drygrid turns per-station window totals into percentiles and SPI, interpolates them by
inverse-distance weighting onto a lat-lon grid, masks cells with too few stations, classifies
cells into severity bands and writes GeoTIFF, GeoJSON, a map picture, a web page and
area-in-drought statistics per region.

The maps are interpolated estimates from a station network, not official drought
declarations: consult your national meteorological or hydrological service and local rules.`,
		Example: `  drygrid demo                       # the whole job on the built-in invented scenario
  drygrid grid --stations spi.csv --out layers/`,
		Version:       version,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		return usageError{fmt.Errorf("%w (see '%s --help')", err, c.CommandPath())}
	})
	root.AddCommand(newGridCmd(), newDemoCmd())
	addCommands(root)
	return root
}

// run executes the command line and maps errors to exit codes.
func run(args []string) int {
	root := newRootCmd()
	root.SetArgs(args)
	cmd, err := root.ExecuteC()
	if err == nil {
		return exitOK
	}
	fmt.Fprintf(os.Stderr, "drygrid: %v\n", err)
	var ue usageError
	if errors.As(err, &ue) || errors.Is(err, pipeline.ErrUsage) || isCobraUsage(err) {
		if cmd != nil {
			fmt.Fprintf(os.Stderr, "Run '%s --help' for usage.\n", cmd.CommandPath())
		}
		return exitUsage
	}
	return exitData
}

func main() {
	stop := startProfile()
	code := run(os.Args[1:])
	stop()
	os.Exit(code)
}
