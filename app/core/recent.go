package core

import (
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
)

// RecentFile names the recent-files list in the state directory.
const RecentFile = "recent.json"

// MaxRecent is how many recent files the list keeps.
const MaxRecent = 10

// Recent is a recently opened or saved file: a session or dataset file
// (Kind "session" or "dataset") by its absolute path.
type Recent struct {
	Path string `json:"path"`
	Kind string `json:"kind"`
}

// LoadRecent reads the recent-files list in dir (empty when there is
// none); files that no longer exist are left out.
func LoadRecent(dir string) ([]Recent, error) {
	b, err := os.ReadFile(filepath.Join(dir, RecentFile))
	if errors.Is(err, fs.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, fmt.Errorf("recent files: %w", err)
	}
	if len(b) > 1<<16 {
		return nil, fmt.Errorf("recent files: %d bytes, want a small JSON list", len(b))
	}
	var rs []Recent
	if err := DecodeJSON(b, &rs); err != nil {
		return nil, fmt.Errorf("%s: %w", filepath.Join(dir, RecentFile), err)
	}
	var out []Recent
	for _, r := range rs {
		if _, err := os.Stat(r.Path); err == nil && (r.Kind == "session" || r.Kind == "dataset") && len(out) < MaxRecent {
			out = append(out, r)
		}
	}
	return out, nil
}

// AddRecent puts path (of kind "session" or "dataset") at the top of the
// list in dir, at most MaxRecent long, and writes it atomically; it
// returns the new list.
func AddRecent(dir, path, kind string) ([]Recent, error) {
	abs, err := filepath.Abs(path)
	if err != nil {
		return nil, fmt.Errorf("recent files: %w", err)
	}
	rs, err := LoadRecent(dir)
	if err != nil {
		rs = nil // a damaged list is replaced
	}
	rs = slices.DeleteFunc(rs, func(r Recent) bool { return r.Path == abs })
	rs = append([]Recent{{Path: abs, Kind: kind}}, rs...)
	if len(rs) > MaxRecent {
		rs = rs[:MaxRecent]
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("recent files: %w", err)
	}
	js, err := json.MarshalIndent(rs, "", "  ")
	if err != nil {
		return nil, fmt.Errorf("recent files: %w", err)
	}
	if err := WriteFileAtomic(filepath.Join(dir, RecentFile), append(js, '\n')); err != nil {
		return nil, fmt.Errorf("recent files: %w", err)
	}
	return rs, nil
}
