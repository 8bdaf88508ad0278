package main

import (
	"broadline/app/cli"
	"os"
	"os/exec"
	"strings"
	"testing"
)

// TestLocaleQuiet re-runs this test binary with the POSIX locale (LANG=C.UTF-8 is
// Debian's default in containers): the toolkit must not
// complain about the locale, because package locale sets one first.
func TestLocaleQuiet(t *testing.T) {
	if os.Getenv("BROADLINE_LOCALE_CHILD") == "1" {
		os.Exit(cli.Main([]string{"version"}, os.Stdout, os.Stderr))
	}
	for _, env := range [][]string{{"LANG=C.UTF-8"}, {"LANG=C", "LC_ALL=C"}, {"LANG="}} {
		cmd := exec.Command(os.Args[0], "-test.run=^TestLocaleQuiet$")
		cmd.Env = append(os.Environ(), "BROADLINE_LOCALE_CHILD=1", "LC_ALL=", "LC_MESSAGES=")
		cmd.Env = append(cmd.Env, env...)
		out, err := cmd.CombinedOutput()
		if err != nil {
			t.Fatalf("child %v: %v\n%s", env, err, out)
		}
		if strings.Contains(string(out), "locale") {
			t.Errorf("locale complaint with %v:\n%s", env, out)
		}
		if !strings.Contains(string(out), "broadline "+cli.Version) {
			t.Errorf("child output %q lacks the version", out)
		}
	}
}
