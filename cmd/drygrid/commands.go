package main

import (
	"fmt"
	"strings"

	"github.com/spf13/cobra"

	"drygrid/bands"
)

// addCommands registers the commands beyond grid and demo.
func addCommands(root *cobra.Command) {
	root.AddCommand(newIndexCmd(), newStatsCmd(), newChartCmd(), newSchemeCmd(), newRunCmd())
	root.AddCommand(newTotalsCmd())   // totals.go
	root.AddCommand(newCrossvalCmd()) // crossval.go
	root.CompletionOptions.HiddenDefaultCmd = true
}

// isCobraUsage recognises cobra's own argument errors (unknown command,
// wrong number of arguments), which are usage errors.
func isCobraUsage(err error) bool {
	s := err.Error()
	return strings.HasPrefix(s, "unknown command") || strings.Contains(s, "arg(s)") ||
		strings.HasPrefix(s, "unknown flag") || strings.HasPrefix(s, "required flag")
}

// newSchemeCmd prints the band scheme file format.
func newSchemeCmd() *cobra.Command {
	var example bool
	cmd := &cobra.Command{
		Use:   "scheme --example",
		Short: "Print a commented band scheme file (the default bands) to start your own",
		Example: `  drygrid scheme --example > bands.toml
  drygrid grid --stations spi.csv --scheme bands.toml --out layers/`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if !example {
				return usagef("scheme: say --example to print the example scheme file")
			}
			_, err := fmt.Fprint(cmd.OutOrStdout(), bands.ExampleSchemeTOML())
			return err
		},
	}
	cmd.Flags().BoolVar(&example, "example", false, "print the example scheme file")
	return cmd
}
