package cli

import (
	"bytes"
	"io"
	"path/filepath"
	"strings"
	"testing"
)

func TestDispatch(t *testing.T) {
	for _, tc := range []struct {
		args       []string
		status     int
		stdoutHas  string
		stderrHas  string
		stderrLine bool // stderr must be exactly one line
	}{
		{args: []string{"help"}, status: 0, stdoutHas: "commands:"},
		{args: []string{"--help"}, status: 0, stdoutHas: "version"},
		{args: []string{"version"}, status: 0, stdoutHas: "broadline " + Version},
		{args: []string{"frobnicate"}, status: 2, stderrHas: `unknown sub-command "frobnicate"`, stderrLine: true},
		{args: []string{"--frobnicate"}, status: 2, stderrHas: "unknown flag --frobnicate", stderrLine: true},
	} {
		var out, errb bytes.Buffer
		got := dispatch(tc.args, &out, &errb)
		if got != tc.status {
			t.Errorf("%v: status %d, want %d", tc.args, got, tc.status)
		}
		if !strings.Contains(out.String(), tc.stdoutHas) {
			t.Errorf("%v: stdout %q lacks %q", tc.args, out.String(), tc.stdoutHas)
		}
		if !strings.Contains(errb.String(), tc.stderrHas) {
			t.Errorf("%v: stderr %q lacks %q", tc.args, errb.String(), tc.stderrHas)
		}
		if tc.stderrLine && strings.Count(errb.String(), "\n") != 1 {
			t.Errorf("%v: stderr is not one line: %q", tc.args, errb.String())
		}
	}
}

// TestCommandFlags checks the shared flag handling with a throw-away command:
// unknown flags are usage errors (status 2), flags may follow positional
// arguments, and a failure while working gives status 1.
func TestCommandFlags(t *testing.T) {
	c := &command{name: "probe-test", summary: "test only"}
	var gotN int
	var gotPos []string
	c.run = func(args []string, stdout, stderr io.Writer) error {
		fs := newFlagSet(c, stdout)
		n := fs.Int("n", 0, "a number")
		pos, err := fs.parse(args)
		if err != nil {
			return err
		}
		gotN, gotPos = *n, pos
		if *n < 0 {
			return usagef("--n must be ≥ 0, got %d", *n)
		}
		if *n == 99 {
			return io.ErrUnexpectedEOF
		}
		return nil
	}
	register(c)
	defer delete(commands, c.name)

	var out, errb bytes.Buffer
	if s := dispatch([]string{"probe-test", "a", "--n", "3", "b"}, &out, &errb); s != 0 {
		t.Fatalf("status %d, stderr %q", s, errb.String())
	}
	if gotN != 3 || len(gotPos) != 2 || gotPos[0] != "a" || gotPos[1] != "b" {
		t.Errorf("parsed n=%d pos=%v, want 3 [a b]", gotN, gotPos)
	}
	for _, tc := range []struct {
		args   []string
		status int
	}{
		{[]string{"probe-test", "--bogus"}, 2},
		{[]string{"probe-test", "--n", "x"}, 2},
		{[]string{"probe-test", "--n", "-1"}, 2},
		{[]string{"probe-test", "--n", "99"}, 1},
		{[]string{"probe-test", "-h"}, 0},
	} {
		errb.Reset()
		if s := dispatch(tc.args, &out, &errb); s != tc.status {
			t.Errorf("%v: status %d, want %d (stderr %q)", tc.args, s, tc.status, errb.String())
		}
		if tc.status == 2 && strings.Count(errb.String(), "\n") != 1 {
			t.Errorf("%v: error is not one line: %q", tc.args, errb.String())
		}
	}
}

// TestBadFileExitsOne is the one exit-status rule (README, "Headless
// commands"): whichever command reads it, a missing or malformed file
// exits with status 1 and one line naming the flag and the file (with
// file:line where the reader knows it), nothing on stdout; a bad value on
// the command line exits with 2 (the commands' own tests).
func TestBadFileExitsOne(t *testing.T) {
	bad := writeTemp(t, "bad.txt", "wavelength_A species log_gf lower_energy_eV\n8544.44 Ca_II abc 1.7\n")
	missing := filepath.Join(t.TempDir(), "missing.txt")
	noUnc := writeTemp(t, "s.txt", "wavelength_um flux\n0.5 1e-17\n0.6 1e-17\n0.7 1e-17\n")
	model := []string{"--mass-fractions", "Ca=0.5,Sr=0.5", "--days", "1.5", "--photosphere-velocity", "0.2c",
		"--outer-velocity", "0.3c", "--temperature", "5000", "--ejecta-mass", "0.03", "--from-um", "0.6", "--to-um", "1.2"}
	plasma := []string{"plasma", "--temperature", "5000", "--density", "1e-13", "--mass-fractions", "Ca=1"}
	opac := []string{"opacity", "--mass-fractions", "Ca=1", "--temperature", "5000", "--density", "1e-13", "--days", "1",
		"--from-um", "0.8", "--to-um", "1.3", "--bin-um", "0.1"}
	for name, c := range map[string]struct {
		args []string
		want string
	}{
		"model, missing list":   {append([]string{"model", "--lines", missing}, model...), "--lines"},
		"model, bad list":       {append([]string{"model", "--lines", bad}, model...), "bad.txt:2"},
		"plasma, missing list":  {append(plasma, "--lines", missing), "--lines"},
		"plasma, bad list":      {append(plasma, "--lines", bad), "bad.txt:2"},
		"plasma, bad levels":    {append(plasma, "--levels", bad), "--levels"},
		"opacity, missing list": {append(opac, "--lines", missing), "--lines"},
		"identify, missing":     {append([]string{"identify", "--spectrum", missing, "--lines", modelLines}, model...), "--spectrum"},
		"sweep, no σ": {append([]string{"sweep", "--spectrum", noUnc, "--lines", modelLines, "--from-velocity", "0.1c", "--to-velocity", "0.25c",
			"--distance-mpc", "40"}, slicesWithout(model, "--photosphere-velocity")...), "uncertainty"},
		"dataset, missing": {[]string{"model", "--dataset", missing}, "--dataset"},
		"prep, missing":    {[]string{"prep", missing}, "missing.txt"},
	} {
		status, out, errs := runCmd(c.args...)
		if status != 1 || out != "" || !strings.Contains(errs, c.want) || strings.Count(strings.TrimSpace(errs), "\n") > 0 {
			t.Errorf("%s: status %d, stdout %q, stderr %q (want 1, nothing, one line naming %s)", name, status, out, errs, c.want)
		}
	}
}

// slicesWithout returns args without the flag name and its value.
func slicesWithout(args []string, name string) []string {
	var out []string
	for i := 0; i < len(args); i++ {
		if args[i] == name {
			i++
			continue
		}
		out = append(out, args[i])
	}
	return out
}

// TestHelpFlag: "broadline COMMAND -h" (and --help) prints the command's
// usage and flags to stdout, nothing to stderr, and exits 0, for every
// command (asked-for help is output, not an error).
func TestHelpFlag(t *testing.T) {
	for name := range commands {
		for _, h := range []string{"-h", "--help"} {
			st, out, errs := runCmd(name, h)
			if st != 0 || errs != "" || !strings.Contains(out, "usage: broadline "+name) || !strings.Contains(out, "flags:") {
				t.Errorf("%s %s: status %d, stdout %q, stderr %q", name, h, st, out, errs)
			}
		}
	}
	if len(commands) < 8 {
		t.Errorf("only %d commands registered", len(commands))
	}
}
