package cli

import (
	"fmt"
	"runtime/debug"
)

// Version is "VERSION (commit C)": commit as set at build time (-ldflags
// "-X main.commit=..."), else the build's VCS stamp, else "unknown".
func Version(version, commit string) string {
	if commit == "" {
		commit = "unknown"
		if info, ok := debug.ReadBuildInfo(); ok {
			for _, s := range info.Settings {
				if s.Key == "vcs.revision" && len(s.Value) >= 7 {
					commit = s.Value[:min(12, len(s.Value))]
				}
			}
		}
	}
	return fmt.Sprintf("%s (commit %s)", version, commit)
}
