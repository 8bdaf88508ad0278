package core

import (
	"errors"
	"fmt"
	"path/filepath"
	"strings"
	"testing"
)

// TestSessionAndWriteMessages: a bad session file is reported with line,
// column and what was expected, never in Go's JSON wording; a failed
// atomic write names the file and not its temporary twin; UserMessage
// drops package prefixes.
func TestSessionAndWriteMessages(t *testing.T) {
	for _, tc := range []struct{ name, file, want string }{
		{"type", "{\n  \"dataset\": 3\n}", `line 2, column 14: "dataset": want a string (in double quotes), not a number`},
		{"syntax", "{\n  \"dataset\" \"demo\"\n}", "line 2, column 13: invalid character"},
		{"unknown", "{\n  \"datasett\": \"demo\"\n}", `line 2, column 3: unknown key "datasett"`},
		{"empty", "  \n", "the file is empty"},
		{"truncated", "{\n  \"dataset\": \"de", "line 2, column 16: the file ends inside the JSON"},
	} {
		_, err := ReadSession(strings.NewReader(tc.file))
		if err == nil {
			t.Errorf("%s: no error", tc.name)
			continue
		}
		msg := UserMessage(err)
		if !strings.Contains(msg, tc.want) {
			t.Errorf("%s: %q lacks %q", tc.name, msg, tc.want)
		}
		for _, bad := range []string{"json:", "Go struct", "cannot unmarshal"} {
			if strings.Contains(msg, bad) {
				t.Errorf("%s: %q leaks %q", tc.name, msg, bad)
			}
		}
	}
	path := filepath.Join(t.TempDir(), "no", "such", "out.json")
	err := WriteFileAtomic(path, []byte("{}"))
	if err == nil || strings.Contains(err.Error(), ".tmp") || !strings.Contains(err.Error(), path) {
		t.Errorf("write into a missing directory: %v", err)
	}
	wrapped := fmt.Errorf("open dataset: %w", fmt.Errorf("linelists: a.txt:3: %w", errors.New("synth: bad")))
	if got := UserMessage(wrapped); got != "open dataset: a.txt:3: bad" {
		t.Errorf("UserMessage = %q", got)
	}
}
