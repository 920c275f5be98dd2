package cli

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/spf13/cobra"
)

func TestCheckOutputsRefusesAnInput(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "digs.csv")
	os.WriteFile(in, []byte("dig\n"), 0o644)
	var ue UsageError
	// The same file by another spelling, existing or not yet.
	for _, out := range []string{in, filepath.Join(dir, "sub", "..", "digs.csv")} {
		os.MkdirAll(filepath.Join(dir, "sub"), 0o755)
		if err := CheckOutputs(map[string]string{"-o": out}, in); !errors.As(err, &ue) || !strings.Contains(err.Error(), "would be overwritten") {
			t.Errorf("-o %s: %v, want a usage error", out, err)
		}
	}
	if err := CheckOutputs(map[string]string{"-o": filepath.Join(dir, "nowhere", "m.spade")}, in); !errors.As(err, &ue) || !strings.Contains(err.Error(), "does not exist") {
		t.Errorf("missing folder: %v", err)
	}
	if err := CheckOutputs(map[string]string{"-o": filepath.Join(dir, "m.spade"), "--plot": "-"}, in, "-", ""); err != nil {
		t.Errorf("a new file: %v", err)
	}
	if left, _ := filepath.Glob(filepath.Join(dir, ".spade-check-*")); len(left) > 0 {
		t.Errorf("the folder check left %v", left)
	}
	// Two outputs naming one file, by two spellings.
	twice := map[string]string{"-o": filepath.Join(dir, "m.spade"), "--plot": filepath.Join(dir, "sub", "..", "m.spade")}
	if err := CheckOutputs(twice, in); !errors.As(err, &ue) || !strings.Contains(err.Error(), "name the same file") {
		t.Errorf("two outputs, one file: %v", err)
	}
}

func TestOneLine(t *testing.T) {
	if got := OneLine(errors.New("digs.csv:4: bad\n  more")); got != "digs.csv:4: bad" {
		t.Errorf("%q", got)
	}
	if got := OneLine(fmt.Errorf("writing: %w", context.Canceled)); got != "interrupted; nothing was written" {
		t.Errorf("%q", got)
	}
}

func TestArgsAndFlagErrorsSayWhatIsWanted(t *testing.T) {
	cmd := &cobra.Command{Use: "train LOG -o MODEL"}
	cmd.Flags().Int("trees", 200, "")
	cmd.Flags().Float64("phase-offset", 0, "")
	check := ExplainArgs(cobra.ExactArgs(1))
	err := check(cmd, []string{"a.csv", "b.csv"})
	var ue UsageError
	if !errors.As(err, &ue) || !strings.Contains(err.Error(), `takes LOG -o MODEL; it was given 2 arguments ("a.csv" and "b.csv")`) {
		t.Errorf("args: %v", err)
	}
	if err := cmd.Flags().Parse([]string{"--tres", "3"}); err != nil {
		got := FlagError(cmd, err)
		if !errors.As(got, &ue) || !strings.Contains(got.Error(), "did you mean --trees?") {
			t.Errorf("unknown flag: %v", got)
		}
	}
	if err := cmd.Flags().Parse([]string{"--trees", "x"}); err != nil {
		if got := FlagError(cmd, err); !strings.Contains(got.Error(), `--trees wants a whole number, got "x"`) {
			t.Errorf("bad value: %v", got)
		}
	}
	cmd.Flags().Parse([]string{"--phase-offset", "nan"})
	if err := FiniteFloatFlags(cmd); !errors.As(err, &ue) || !strings.Contains(err.Error(), "--phase-offset must be a finite number") {
		t.Errorf("nan: %v", err)
	}
}
