package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// goTool returns the go command, or skips the test.
func goTool(t *testing.T) string {
	t.Helper()
	gobin, err := exec.LookPath("go")
	if err != nil {
		t.Skip("go tool not on PATH")
	}
	return gobin
}

// TestOnlyTheGUIImportsFyne enforces the project's layering rule
// (DEVELOPERS.md): of all the module's packages, only app/gui (and the
// main package that starts it) may depend, directly or indirectly, on the
// GUI toolkit; and the main package built with -tags nogui does not.
func TestOnlyTheGUIImportsFyne(t *testing.T) {
	gobin := goTool(t)
	out, err := exec.Command(gobin, "list", "-f", `{{.ImportPath}} {{join .Deps " "}}`, "broadline/...").CombinedOutput()
	if err != nil {
		t.Fatalf("go list: %v\n%s", err, out)
	}
	lines := strings.Split(strings.TrimSpace(string(out)), "\n")
	if len(lines) < 10 {
		t.Fatalf("go list returned too little: %q", out)
	}
	for _, l := range lines {
		f := strings.Fields(l)
		pkg := f[0]
		if pkg == "broadline/app" || pkg == "broadline/app/gui" {
			continue
		}
		for _, d := range f[1:] {
			if strings.HasPrefix(d, "fyne.io/") {
				t.Errorf("%s depends on %s", pkg, d)
				break
			}
		}
	}
	out, err = exec.Command(gobin, "list", "-tags", "nogui", "-deps", "broadline/app").CombinedOutput()
	if err != nil {
		t.Fatalf("go list -tags nogui: %v\n%s", err, out)
	}
	for _, d := range strings.Fields(string(out)) {
		if strings.HasPrefix(d, "fyne.io/") || strings.HasPrefix(d, "github.com/go-gl/") {
			t.Errorf("the nogui build depends on %s", d)
		}
	}
}

// TestHeadlessBuild builds the headless binary as a cluster node would
// (no cgo, -tags nogui) and runs it: a sub-command works, and the
// workbench says it is not in this build.
func TestHeadlessBuild(t *testing.T) {
	if testing.Short() {
		t.Skip("builds a binary")
	}
	gobin := goTool(t)
	bin := filepath.Join(t.TempDir(), "broadline")
	cmd := exec.Command(gobin, "build", "-tags", "nogui", "-o", bin, ".")
	cmd.Env = append(os.Environ(), "CGO_ENABLED=0")
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("CGO_ENABLED=0 go build -tags nogui: %v\n%s", err, out)
	}
	out, err := exec.Command(bin, "version").CombinedOutput()
	if err != nil || !strings.HasPrefix(string(out), "broadline ") {
		t.Errorf("version: %v, %q", err, out)
	}
	out, err = exec.Command(bin).CombinedOutput()
	if err == nil || !strings.Contains(string(out), "nogui") {
		t.Errorf("workbench in the nogui build: %v, %q", err, out)
	}
}
