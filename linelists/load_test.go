package linelists

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"testing"
)

// TestLoadContextProgress: the reports of a 3-MB text file start at 0,
// never go back, come about once per megabyte and end with the whole file;
// the store is Load's. Read again, the file comes from its cache, which the
// reports say.
func TestLoadContextProgress(t *testing.T) {
	text := benchText(70000) // ~3 MB
	for _, workers := range []int{1, 2} {
		p := filepath.Join(t.TempDir(), "big.txt")
		if err := os.WriteFile(p, text, 0o644); err != nil {
			t.Fatal(err)
		}
		var got []Progress
		opts := Options{Workers: workers, Progress: func(pr Progress) { got = append(got, pr) }}
		st, _, err := LoadContext(context.Background(), []string{p}, opts)
		if err != nil {
			t.Fatal(err)
		}
		size := int64(len(text))
		if len(got) < 4 {
			t.Fatalf("workers %d: %d reports for a %d-byte file, want a start, one per megabyte and an end", workers, len(got), size)
		}
		if got[0].Done != 0 || got[0].FileDone || got[0].File != p || got[0].Files != 1 {
			t.Errorf("first report %+v", got[0])
		}
		for i := 1; i < len(got); i++ {
			if got[i].Done < got[i-1].Done {
				t.Errorf("report %d goes back: %d after %d", i, got[i].Done, got[i-1].Done)
			}
		}
		last := got[len(got)-1]
		if !last.FileDone || last.Done != size || last.Total != size {
			t.Errorf("last report %+v, want the whole %d bytes, done", last, size)
		}
		ref, _, err := Load([]string{p}, Options{Cache: CacheOff})
		if err != nil {
			t.Fatal(err)
		}
		sameStore(t, st, ref)

		got = nil
		if _, _, err := LoadContext(context.Background(), []string{p}, opts); err != nil {
			t.Fatal(err)
		}
		if len(got) != 3 || !got[1].Cached || !got[2].FileDone {
			t.Errorf("read from the cache: reports %+v, want start, cached, done", got)
		}
	}
}

// TestLoadContextCancel: cancelled while it parses, LoadContext returns an
// error that wraps context.Canceled, no store and no cache; the next load
// reads the file whole.
func TestLoadContextCancel(t *testing.T) {
	text := benchText(70000)
	for _, workers := range []int{1, 2} {
		p := filepath.Join(t.TempDir(), "big.txt")
		if err := os.WriteFile(p, text, 0o644); err != nil {
			t.Fatal(err)
		}
		ctx, cancel := context.WithCancel(context.Background())
		var seen int64
		opts := Options{Workers: workers, Progress: func(pr Progress) {
			seen = pr.Done
			if pr.Done >= 1<<20 {
				cancel()
			}
		}}
		st, _, err := LoadContext(ctx, []string{p}, opts)
		if !errors.Is(err, context.Canceled) || st != nil {
			t.Fatalf("workers %d: cancelled load gave store %v, error %v", workers, st != nil, err)
		}
		if seen >= int64(len(text)) {
			t.Errorf("workers %d: read the whole file (%d bytes) after the cancel", workers, seen)
		}
		if _, err := os.Stat(p + cacheSuffix); !errors.Is(err, os.ErrNotExist) {
			t.Errorf("workers %d: a cache was written for a cancelled load (%v)", workers, err)
		}
		st, rep, err := LoadContext(context.Background(), []string{p}, Options{Workers: workers})
		if err != nil || rep.Lines != 70000 {
			t.Fatalf("workers %d: load after the cancel: %d lines, %v", workers, rep.Lines, err)
		}
		_ = st
	}
	// Cancelled before it starts: nothing is opened.
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, _, err := LoadContext(ctx, []string{"/nonexistent/list.txt"}, Options{}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled before the start: %v", err)
	}
}
