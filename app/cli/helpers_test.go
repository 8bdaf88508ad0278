package cli

import (
	"broadline/internal/demogen"
	"bytes"
	"os"
	"path/filepath"
	"testing"
)

// writeTemp writes content to a file called name in a fresh temporary
// directory and returns its path.
func writeTemp(t *testing.T, name, content string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// runCmd runs a sub-command through the dispatcher, as the program does,
// and returns its exit status, stdout and stderr.
func runCmd(args ...string) (status int, stdout, stderr string) {
	var out, errb bytes.Buffer
	s := dispatch(args, &out, &errb)
	return s, out.String(), errb.String()
}

// demoData is the built-in demo's scenario (how its invented spectra were
// made), read from app/demo on disk.
func demoData(t *testing.T) struct{ Scenario *demogen.Scenario } {
	t.Helper()
	f, err := os.Open(filepath.Join("..", "demo", "spectra", "scenario.json"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc, err := demogen.ReadScenario(f)
	if err != nil {
		t.Fatal(err)
	}
	return struct{ Scenario *demogen.Scenario }{sc}
}
