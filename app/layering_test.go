package main

import (
	"os/exec"
	"strings"
	"testing"
)

// TestNoGUIInComputation enforces the project's layering rule (DEVELOPERS.md):
// no computational package may depend, directly or indirectly, on fyne.
func TestNoGUIInComputation(t *testing.T) {
	gobin, err := exec.LookPath("go")
	if err != nil {
		t.Skip("go tool not on PATH")
	}
	out, err := exec.Command(gobin, "list", "-deps", "../linelists/...", "../spectra/...", "../opacity/...", "../tools/...").CombinedOutput()
	if err != nil {
		t.Fatalf("go list: %v\n%s", err, out)
	}
	deps := strings.Fields(string(out))
	if len(deps) < 3 {
		t.Fatalf("go list returned too little: %q", out)
	}
	for _, d := range deps {
		if strings.HasPrefix(d, "fyne.io/") {
			t.Errorf("a computational package depends on %s", d)
		}
	}
}
