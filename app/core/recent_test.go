package core

import (
	"os"
	"path/filepath"
	"testing"
)

// TestRecentFiles: the newest first, no duplicates, at most MaxRecent,
// files since removed left out, a damaged list replaced on the next add.
func TestRecentFiles(t *testing.T) {
	dir := t.TempDir()
	files := t.TempDir()
	var paths []string
	for i := range MaxRecent + 2 {
		p := filepath.Join(files, "s"+string(rune('a'+i))+".json")
		if err := os.WriteFile(p, []byte("{}"), 0o644); err != nil {
			t.Fatal(err)
		}
		paths = append(paths, p)
		if _, err := AddRecent(dir, p, "session"); err != nil {
			t.Fatal(err)
		}
	}
	rs, err := AddRecent(dir, paths[3], "session")
	if err != nil {
		t.Fatal(err)
	}
	if len(rs) != MaxRecent || rs[0].Path != paths[3] || rs[1].Path != paths[len(paths)-1] {
		t.Errorf("list %v", rs)
	}
	os.Remove(paths[len(paths)-1])
	got, err := LoadRecent(dir)
	if err != nil || len(got) != MaxRecent-1 {
		t.Errorf("after removing a file: %d entries (%v)", len(got), err)
	}
	if err := os.WriteFile(filepath.Join(dir, RecentFile), []byte("[{"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := LoadRecent(dir); err == nil {
		t.Error("a damaged list read without error")
	}
	if rs, err := AddRecent(dir, paths[0], "dataset"); err != nil || len(rs) != 1 {
		t.Errorf("adding over a damaged list: %v %v", rs, err)
	}
}
