package cli

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// readmeExamples are the commands of the README's "Examples" block: lines
// joined at a trailing backslash, comments dropped, a for loop run with its
// first value, each command split into its arguments (double quotes group)
// and its "> FILE" redirect.
func readmeExamples(t *testing.T) (cmds [][]string, outs []string) {
	t.Helper()
	data, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	text := string(data)
	i := strings.Index(text, "\nExamples, each runnable")
	if i < 0 {
		t.Fatal("README has no Examples block")
	}
	block := text[i:]
	block = block[strings.Index(block, "```\n")+4:]
	block = block[:strings.Index(block, "```")]
	block = strings.ReplaceAll(block, "\\\n", " ")
	loopVar, loopVal := "", ""
	for _, line := range strings.Split(block, "\n") {
		if k := strings.Index(line, "#"); k >= 0 && !strings.Contains(line[:k], "\"") {
			line = line[:k]
		}
		line = strings.TrimSpace(line)
		switch {
		case line == "" || line == "done":
			continue
		case strings.HasPrefix(line, "for "):
			f := strings.Fields(line) // for v in 0.15 …; do
			loopVar, loopVal = f[1], f[3]
			continue
		}
		if loopVar != "" {
			line = strings.ReplaceAll(line, "${"+loopVar+"}", loopVal)
			line = strings.ReplaceAll(line, "$"+loopVar, loopVal)
		}
		out := ""
		if k := strings.Index(line, " > "); k >= 0 {
			out = strings.TrimSpace(line[k+3:])
			line = line[:k]
		}
		var args []string
		quoted := strings.Split(line, "\"")
		for q, part := range quoted {
			if q%2 == 1 {
				args = append(args, part)
				continue
			}
			args = append(args, strings.Fields(part)...)
		}
		if len(args) == 0 || args[0] != "broadline" {
			t.Fatalf("README example is not a broadline command: %q", line)
		}
		cmds = append(cmds, args[1:])
		outs = append(outs, out)
	}
	return cmds, outs
}

// TestReadmeExamples runs every example of the README on the demo written
// by its first command, in a fresh directory, and requires exit status 0
// and output where the example redirects it. The fit example (minutes
// as written) is run with --preview and --samples 10 to keep the test
// short; its flags are otherwise as written.
func TestReadmeExamples(t *testing.T) {
	if testing.Short() || raceEnabled {
		t.Skip("runs syntheses and a fit: not with -short or the race detector (make test runs it without)")
	}
	cmds, outs := readmeExamples(t)
	if len(cmds) < 8 || cmds[0][0] != "example" {
		t.Fatalf("README examples: %q", cmds)
	}
	dir := t.TempDir()
	wd, err := os.Getwd()
	if err != nil {
		t.Fatal(err)
	}
	if err := os.Chdir(dir); err != nil {
		t.Fatal(err)
	}
	defer os.Chdir(wd)
	for i, args := range cmds {
		if args[0] == "fit" {
			for k := range args {
				if args[k] == "--samples" && k+1 < len(args) {
					args[k+1] = "10"
				}
			}
			args = append(args, "--preview")
		}
		status, out, errs := runCmd(args...)
		if status != 0 {
			t.Errorf("broadline %s: status %d: %s", strings.Join(args, " "), status, errs)
			continue
		}
		if outs[i] != "" {
			if out == "" {
				t.Errorf("broadline %s: nothing on stdout for %s", strings.Join(args, " "), outs[i])
			}
			if err := os.WriteFile(outs[i], []byte(out), 0o644); err != nil {
				t.Fatal(err)
			}
		}
	}
}
