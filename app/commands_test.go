package main

import (
	"bytes"
	"io"
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
		{args: []string{"version"}, status: 0, stdoutHas: "broadline " + version},
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
		fs := newFlagSet(c, stderr)
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
