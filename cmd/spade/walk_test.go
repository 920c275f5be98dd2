package main

import (
	"testing"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

func TestEveryCommandHasHelpAndExample(t *testing.T) {
	// Every subcommand: a short help, an example, and no flag that clashes
	// with a persistent one.
	root := newRootCommand(&globalOptions{})
	persistent := map[string]bool{}
	root.PersistentFlags().VisitAll(func(f *pflag.Flag) { persistent[f.Name] = true })
	var walk func(c *cobra.Command)
	walk = func(c *cobra.Command) {
		for _, sub := range c.Commands() {
			if sub.Hidden || sub.Name() == "help" || sub.Name() == "completion" {
				continue
			}
			if sub.Short == "" || sub.Example == "" {
				t.Errorf("%s: short help %q, example %q", sub.CommandPath(), sub.Short, sub.Example)
			}
			sub.LocalNonPersistentFlags().VisitAll(func(f *pflag.Flag) {
				if persistent[f.Name] {
					t.Errorf("%s: --%s clashes with a global flag", sub.CommandPath(), f.Name)
				}
			})
			walk(sub)
		}
	}
	walk(root)
	if len(root.Commands()) < 9 {
		t.Errorf("only %d commands", len(root.Commands()))
	}
}

func TestVersionAndExitCodes(t *testing.T) {
	out, _, code := spade(t, "", "--version")
	if code != 0 || out == "" || out[:6] != "spade " {
		t.Errorf("--version: exit %d, %q", code, out)
	}
	out, _, _ = spade(t, "", "--help")
	for _, want := range []string{"Exit codes:", "0  success", "2  a usage error", "do not dig"} {
		if !contains(out, want) {
			t.Errorf("root help lacks %q", want)
		}
	}
	if _, _, code := spade(t, "", "train"); code != exitUsage {
		t.Errorf("train without a log: exit %d", code)
	}
	if _, _, code := spade(t, "", "bogus"); code != exitUsage {
		t.Errorf("unknown command: exit %d", code)
	}
}

func contains(s, sub string) bool {
	return len(sub) == 0 || (len(s) >= len(sub) && (s[:len(sub)] == sub || contains(s[1:], sub)))
}

func TestVersionNamesCommit(t *testing.T) {
	out, _, _ := spade(t, "", "--version")
	if !contains(out, "(commit ") {
		t.Errorf("--version %q names no commit", out)
	}
}
