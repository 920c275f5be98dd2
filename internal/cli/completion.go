package cli

import (
	"strings"

	"github.com/spf13/cobra"
)

// RegisterCompletions offers the values of spade's flags that take one of
// a few words (--format: the command's own list, from its help; --label,
// --group, --date-format, and --scenario from scenarios), and files of
// their kind for the flags that name files.
func RegisterCompletions(c *cobra.Command, scenarios []string) {
	words := map[string][]string{
		"label":       {"material", "shape", "both"},
		"group":       {"site", "date", "month"},
		"date-format": {"dmy", "mdy"},
	}
	words["scenario"] = scenarios
	if f := c.Flags().Lookup("format"); f != nil {
		words["format"] = strings.Split(f.Usage, ", ")
	}
	// Flags that name files complete to files, of the kind they take.
	for name, exts := range map[string][]string{
		"model": {"spade"}, "values": {"toml"}, "plot": {"png", "svg"}, "output": nil,
	} {
		if c.Flags().Lookup(name) != nil {
			c.MarkFlagFilename(name, exts...)
		}
	}
	for name, values := range words {
		if c.Flags().Lookup(name) == nil {
			continue
		}
		c.RegisterFlagCompletionFunc(name, func(*cobra.Command, []string, string) ([]string, cobra.ShellCompDirective) {
			return values, cobra.ShellCompDirectiveNoFileComp
		})
	}
}
