package main

import (
	"strings"

	"github.com/spf13/cobra"
)

// addCommands registers the commands beyond grid and demo.
func addCommands(root *cobra.Command) {
	_ = root
}

// isCobraUsage recognises cobra's own argument errors (unknown command,
// wrong number of arguments), which are usage errors.
func isCobraUsage(err error) bool {
	s := err.Error()
	return strings.HasPrefix(s, "unknown command") || strings.Contains(s, "arg(s)") ||
		strings.HasPrefix(s, "unknown flag") || strings.HasPrefix(s, "required flag")
}
