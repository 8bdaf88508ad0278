package cli

import (
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// leaks are pieces of a message that belong to the program's insides, not
// to its user: Go's JSON wording and type names, package prefixes, the
// atomic writer's temporary files, 0-based epoch indices.
var leaks = []string{"Go struct", "Go value", "cannot unmarshal", ".tmp", "epochs[", "float64", "int64"}

// leakPrefix is a package's name as a message prefix (not a file name
// ending in .json, nor "broadline grid:").
var leakPrefix = regexp.MustCompile(`(^|: )(json|linelists|synth|grid|spectra|opacity|fit|core): `)

// TestMessagesOfBadFiles runs the commands on bad dataset and grid-spec
// files (each a mutation of the demo written by "broadline example") and
// checks each message: status 1, one line, the expected words and place
// (line and column for JSON mistakes, epochs numbered from 1), and none of
// the internal pieces in leaks.
func TestMessagesOfBadFiles(t *testing.T) {
	dir := t.TempDir()
	if st, _, errs := runCmd("example", dir); st != 0 {
		t.Fatalf("example: %s", errs)
	}
	good, err := os.ReadFile(filepath.Join(dir, "dataset.json"))
	if err != nil {
		t.Fatal(err)
	}
	ds := string(good)
	if err := os.WriteFile(filepath.Join(dir, "lines", "broken.txt"), []byte("this is not a line list\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	replace := func(old, new string) string {
		if !strings.Contains(ds, old) {
			t.Fatalf("dataset.json lacks %q", old)
		}
		return strings.Replace(ds, old, new, 1)
	}
	lineOf := func(s, sub string) string { // "line N" of the first sub in s
		return "line " + itoa(1+strings.Count(s[:strings.Index(s, sub)], "\n"))
	}
	cases := []struct {
		name, file string
		want       []string
	}{
		{"type", replace(`"distance_mpc": 62`, `"distance_mpc": "62"`),
			[]string{lineOf(ds, `"distance_mpc"`), `"distance_mpc": want a number, not a string`}},
		{"syntax", replace(`"resolving_power": 500,`, `"resolving_power": 500`),
			[]string{lineOf(ds, `"line_files"`) + ", column 3", "invalid character"}},
		{"unknown key", replace(`"distance_mpc"`, `"distanse_mpc"`),
			[]string{lineOf(ds, `"distance_mpc"`) + ", column 3", `unknown key "distanse_mpc"`}},
		{"truncated", ds[:len(ds)/2], []string{"ends inside the JSON"}},
		{"empty", "", []string{"empty"}},
		{"trailing", ds + "{}", []string{"more after the end"}},
		{"nested type", replace(`"days": 1.5`, `"days": true`),
			[]string{lineOf(ds, `"days": 1.5`), `"epochs.days": want a number, not true/false`}},
		{"epoch value", replace(`"temperature_k": 5000`, `"temperature_k": 99`),
			[]string{"epoch 1: temperature_k 99"}},
		{"bad line list", replace(`"lines/demo_ca.txt.gz"`, `"lines/broken.txt"`),
			[]string{"broken.txt:1"}},
	}
	for _, tc := range cases {
		path := filepath.Join(dir, "bad-"+strings.ReplaceAll(tc.name, " ", "-")+".json")
		if err := os.WriteFile(path, []byte(tc.file), 0o644); err != nil {
			t.Fatal(err)
		}
		st, out, errs := runCmd("model", "--dataset", path)
		checkMessage(t, tc.name, st, out, errs, tc.want)
	}

	// Grid specs.
	spec := `{
  "format": "broadline grid 1",
  "axes": [
    {"quantity": "photosphere_velocity_c", "values": ["0.2"]}
  ]
}`
	for _, tc := range []struct {
		name, file string
		want       []string
	}{
		{"spec type", spec, []string{"line 4, column", `"axes.values": want a number, not a string`}},
		{"spec syntax", strings.Replace(spec, `"axes":`, `"axes"`, 1), []string{"line 3, column", "invalid character"}},
		{"spec unknown key", strings.Replace(spec, `"axes"`, `"axis"`, 1), []string{"line 3", `unknown key "axis"`}},
	} {
		path := filepath.Join(dir, "spec-"+strings.ReplaceAll(tc.name, " ", "-")+".json")
		if err := os.WriteFile(path, []byte(tc.file), 0o644); err != nil {
			t.Fatal(err)
		}
		st, out, errs := runCmd("grid", "--dataset", filepath.Join(dir, "dataset.json"), "--spec", path)
		checkMessage(t, tc.name, st, out, errs, tc.want)
	}
}

func checkMessage(t *testing.T, name string, st int, out, errs string, want []string) {
	t.Helper()
	if st != 1 || out != "" || strings.Count(errs, "\n") != 1 {
		t.Errorf("%s: status %d, stdout %.200q, stderr %.600q; want 1, nothing, one line", name, st, out, errs)
	}
	for _, w := range want {
		if !strings.Contains(errs, w) {
			t.Errorf("%s: message %q lacks %q", name, errs, w)
		}
	}
	for _, l := range leaks {
		if strings.Contains(errs, l) {
			t.Errorf("%s: message %q leaks %q", name, errs, l)
		}
	}
	if m := leakPrefix.FindString(errs[strings.Index(errs, ": ")+2:]); m != "" {
		t.Errorf("%s: message %q leaks the prefix %q", name, errs, m)
	}
}

func itoa(n int) string { return strconv.Itoa(n) }
