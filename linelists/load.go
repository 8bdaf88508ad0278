package linelists

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"broadline/physics"
)

// CacheMode says whether Load uses the binary cache.
type CacheMode uint8

// Cache modes. The zero value uses the cache.
const (
	CacheUse   CacheMode = iota // read a valid cache, (re)write a missing or bad one
	CacheOff                    // neither read nor write a cache
	CacheWrite                  // always parse and rewrite the cache
)

// Options controls Load. The zero value reads our format, vacuum unless
// a file says otherwise, through the cache next to each file.
type Options struct {
	// Import, when not nil, reads every file as an arbitrary table with
	// this column mapping.
	Import *Import
	// Medium of the wavelengths when a file does not say.
	Medium physics.Medium
	// Species of every line, for files in our format without a species
	// column.
	Species Species
	// Filter selects lines after loading; the others are counted.
	Filter Filter
	// Levels are levels files (see Builder.ReadLevels).
	Levels []string
	// Overrides is a file of ionisation energies and ground weights that
	// replace the element table's (see ReadOverrides); "" for none.
	Overrides string
	// KeepDuplicates keeps duplicate lines (they are counted either way).
	KeepDuplicates bool
	// Workers is the number of goroutines parsing each text file (≤ 1:
	// the calling goroutine); runtime.GOMAXPROCS(0) is a good choice.
	Workers int
	// Cache selects the cache mode.
	Cache CacheMode
	// CacheDir, when set, holds the caches; otherwise a cache is written
	// next to its file (name + ".blcache"), or in the user cache directory
	// when that directory is not writable.
	CacheDir string
	// Progress, when not nil, is called as LoadContext reads: once when
	// each file starts, about once per megabyte of a file parsed from its
	// text, and once when each file is done. The calls come one at a time
	// but not always from the caller's goroutine (the text is read ahead of
	// the parsing workers); it must return quickly (e.g. post the figures
	// to a widget).
	Progress func(Progress)
}

// Progress is what LoadContext reports while it reads.
type Progress struct {
	File         string // the line-list file being read
	Index, Files int    // its index among the files (from 0) and their number
	// Done and Total are the bytes of the file read so far and its size
	// (compressed bytes for a gzip file); Total is 0 when unknown.
	Done, Total int64
	// Cached says the file's cache is being read (one step, no bytes).
	Cached bool
	// FileDone says the file is read; the merge (several files or levels
	// files) follows the last one.
	FileDone bool
}

// cacheSuffix is appended to a line-list file's name for its cache.
const cacheSuffix = ".blcache"

// Load reads and merges line-list files (gzip or not) and optional levels
// files into one Store, using the binary cache for each line-list file.
// Lines left out by opts.Filter are counted in the report.
func Load(paths []string, opts Options) (*Store, Report, error) {
	return LoadContext(context.Background(), paths, opts)
}

// LoadContext is Load that gives up when ctx is done — returning an error
// that wraps ctx.Err() and no store; a cache being written is not left
// behind half-written (caches are written atomically) — and reports its
// progress to opts.Progress.
func LoadContext(ctx context.Context, paths []string, opts Options) (*Store, Report, error) {
	s, rep, err := load(ctx, paths, opts)
	if err != nil && ctx.Err() != nil {
		return nil, Report{}, fmt.Errorf("linelists: loading stopped: %w", ctx.Err())
	}
	return s, rep, err
}

func load(ctx context.Context, paths []string, opts Options) (*Store, Report, error) {
	var rep Report
	if len(paths) == 0 {
		return nil, rep, fmt.Errorf("linelists: Load: no files")
	}
	oh := optionsHash(&opts)
	stores := make([]*Store, 0, len(paths))
	for i, p := range paths {
		if err := ctx.Err(); err != nil {
			return nil, Report{}, err
		}
		pr := progressOf(ctx, opts.Progress, p, i, len(paths))
		s, fr, warn, err := loadOne(p, &opts, oh, pr)
		if err != nil {
			return nil, Report{}, err
		}
		pr.fileDone()
		if warn != "" {
			rep.Warnings = append(rep.Warnings, warn)
		}
		stores = append(stores, s)
		rep.Files = append(rep.Files, fr)
		rep.Duplicates += fr.Duplicates
		rep.GroundAdded += fr.GroundAdded
	}
	var s *Store
	if len(stores) == 1 && len(opts.Levels) == 0 {
		s = stores[0]
	} else {
		b := NewBuilder()
		b.KeepDuplicates = opts.KeepDuplicates
		for _, st := range stores {
			b.AddStore(st)
		}
		for _, lp := range opts.Levels {
			f, err := os.Open(lp)
			if err != nil {
				return nil, Report{}, fmt.Errorf("linelists: levels file: %w", err)
			}
			_, err = b.ReadLevels(f, LevelsOptions{Name: lp})
			f.Close()
			if err != nil {
				return nil, Report{}, err
			}
		}
		if err := ctx.Err(); err != nil {
			return nil, Report{}, err
		}
		var mrep Report
		s, mrep = b.Build()
		rep.Duplicates += mrep.Duplicates
		rep.GroundAdded += mrep.GroundAdded
		rep.LevelsMatched += mrep.LevelsMatched
		rep.Warnings = append(rep.Warnings, mrep.Warnings...)
	}
	if opts.Overrides != "" {
		f, err := os.Open(opts.Overrides)
		if err != nil {
			return nil, Report{}, fmt.Errorf("linelists: overrides file: %w", err)
		}
		o, err := ReadOverrides(f, opts.Overrides)
		f.Close()
		if err != nil {
			return nil, Report{}, err
		}
		s.Overrides = o
	}
	if opts.Filter.active() {
		var sk Skipped
		s, sk = s.Filter(opts.Filter)
		rep.Skipped.add(sk)
	}
	rep.Lines = s.Len()
	return s, rep, nil
}

// loadOne reads one file through its cache.
func loadOne(path string, opts *Options, oh uint64, pr *progress) (*Store, FileReport, string, error) {
	if opts.Cache == CacheOff {
		s, fr, err := parseFile(path, opts, pr)
		return s, fr, "", err
	}
	id, err := identify(path, oh)
	if err != nil {
		return nil, FileReport{}, "", fmt.Errorf("linelists: %w", err)
	}
	cp := cachePath(path, opts.CacheDir)
	warn := ""
	if opts.Cache == CacheUse {
		pr.cached()
		s, fr, err := readCache(cp, id)
		if err == nil {
			fr.Name = path
			return s, fr, "", nil
		}
		if !errors.Is(err, os.ErrNotExist) {
			warn = fmt.Sprintf("cache %s not used (%v); rebuilt from the source", cp, errors.Unwrap(err))
		}
	}
	s, fr, err := parseFile(path, opts, pr)
	if err != nil {
		return nil, fr, "", err
	}
	if err := writeCache(cp, s, fr, id); err != nil {
		alt := userCachePath(path)
		if opts.CacheDir == "" && alt != "" {
			if err2 := os.MkdirAll(filepath.Dir(alt), 0o755); err2 == nil {
				err = writeCache(alt, s, fr, id)
			}
		}
		if err != nil {
			warn = fmt.Sprintf("could not write the cache for %s: %v", path, err)
		}
	}
	return s, fr, warn, nil
}

// parseFile reads one file without the cache.
func parseFile(path string, opts *Options, pr *progress) (*Store, FileReport, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, FileReport{}, fmt.Errorf("linelists: %w", err)
	}
	defer f.Close()
	var r io.Reader = f
	if pr != nil {
		r = pr.reader(f)
	}
	b := NewBuilder()
	b.KeepDuplicates = opts.KeepDuplicates
	fr, err := b.Read(r, ReadOptions{Name: path, Import: opts.Import, Medium: opts.Medium, Species: opts.Species, Workers: opts.Workers})
	if err != nil {
		return nil, fr, err
	}
	s, rep := b.Build()
	fr.Duplicates = rep.Duplicates
	fr.GroundAdded = rep.GroundAdded
	return s, fr, nil
}

// cachePath picks where the cache of path lives: in dir when given, else
// next to the file, unless a valid cache already sits in the user cache
// directory and none next to the file.
func cachePath(path, dir string) string {
	if dir != "" {
		return filepath.Join(dir, cacheName(path))
	}
	next := path + cacheSuffix
	if _, err := os.Stat(next); err == nil {
		return next
	}
	if alt := userCachePath(path); alt != "" {
		if _, err := os.Stat(alt); err == nil {
			return alt
		}
	}
	return next
}

// cacheName is a file name for the cache of path in a shared directory.
func cacheName(path string) string {
	abs, err := filepath.Abs(path)
	if err != nil {
		abs = path
	}
	h := sha256.Sum256([]byte(abs))
	return filepath.Base(path) + "-" + hex.EncodeToString(h[:6]) + cacheSuffix
}

func userCachePath(path string) string {
	d, err := os.UserCacheDir()
	if err != nil {
		return ""
	}
	return filepath.Join(d, "broadline", "lines", cacheName(path))
}

// progress reports one file's reading to Options.Progress and stops the
// reading when ctx is done. A nil *progress does nothing (no context to
// watch and no one to tell).
type progress struct {
	ctx  context.Context
	fn   func(Progress)
	p    Progress
	last int64 // Done when last reported
}

// progressOf returns the progress of file i of n, or nil when there is
// neither a callback nor a context that can be cancelled.
func progressOf(ctx context.Context, fn func(Progress), path string, i, n int) *progress {
	if fn == nil && ctx.Done() == nil {
		return nil
	}
	pr := &progress{ctx: ctx, fn: fn, p: Progress{File: path, Index: i, Files: n}}
	pr.report()
	return pr
}

func (pr *progress) report() {
	if pr != nil && pr.fn != nil {
		pr.fn(pr.p)
		pr.last = pr.p.Done
	}
}

func (pr *progress) cached() {
	if pr != nil {
		pr.p.Cached = true
		pr.report()
	}
}

func (pr *progress) fileDone() {
	if pr != nil {
		pr.p.FileDone = true
		if pr.p.Total > 0 {
			pr.p.Done = pr.p.Total
		}
		pr.report()
	}
}

// reader wraps f so that reading it counts the bytes and fails with
// ctx.Err() once ctx is done.
func (pr *progress) reader(f *os.File) io.Reader {
	pr.p.Cached = false
	if fi, err := f.Stat(); err == nil && fi.Mode().IsRegular() {
		pr.p.Total = fi.Size()
	}
	return &progressReader{f: f, pr: pr}
}

// progressReader is the reader of progress.reader. Len tells the parser
// how much is left, as the *os.File it wraps would (inputSize).
type progressReader struct {
	f  *os.File
	pr *progress
}

func (r *progressReader) Read(b []byte) (int, error) {
	if err := r.pr.ctx.Err(); err != nil {
		return 0, err
	}
	n, err := r.f.Read(b)
	r.pr.p.Done += int64(n)
	if r.pr.p.Done-r.pr.last >= 1<<20 {
		r.pr.report()
	}
	return n, err
}

func (r *progressReader) Len() int {
	if r.pr.p.Total == 0 {
		return 0
	}
	return int(max(r.pr.p.Total-r.pr.p.Done, 0))
}
