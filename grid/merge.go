package grid

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strings"
)

// ErrMerge is wrapped by Merge's refusals (missing, duplicate or
// mismatched parts).
var ErrMerge = errors.New("cannot merge grid parts")

// Merge combines the parts of one grid (all n shards of the same kind,
// spec, inputs, epochs and wavelengths, each complete and valid) into the
// file out, written atomically (mode 0644). The result is byte for byte
// the part an unsharded run (shard 0/1) writes. It refuses, naming the
// files, missing or duplicate shards, parts that differ in anything but the
// shard, and incomplete or damaged parts; out is then not written. It
// returns what the merged file holds.
func Merge(out string, parts ...string) (*PartInfo, error) {
	if len(parts) == 0 {
		return nil, fmt.Errorf("grid: merge: no parts given: %w", ErrMerge)
	}
	if len(parts) > MaxShards {
		return nil, fmt.Errorf("grid: merge: %d parts, more than %d: %w", len(parts), MaxShards, ErrMerge)
	}
	abs, _ := filepath.Abs(out)
	readers := make([]*partReader, len(parts))
	for i, p := range parts {
		if pa, _ := filepath.Abs(p); pa == abs {
			return nil, fmt.Errorf("grid: merge: the output %s is also a part: %w", out, ErrMerge)
		}
		f, err := os.Open(p)
		if err != nil {
			return nil, fmt.Errorf("grid: merge: %w", err)
		}
		defer f.Close()
		r, err := newPartReader(f, p)
		if err != nil {
			return nil, mergeErr(err)
		}
		readers[i] = r
	}
	// Every part must be the same grid; their header with the shard set
	// to 0/1 is the merged file's.
	first := readers[0]
	whole := first.h
	whole.shard = Whole
	want := whole.bytes()
	n := first.h.shard.Count
	byIndex := make([]*partReader, n)
	for i, r := range readers {
		h := r.h
		if h.shard.Count != n {
			return nil, fmt.Errorf("grid: merge: %s is shard %s but %s is shard %s (parts of different splits): %w",
				parts[i], h.shard, parts[0], first.h.shard, ErrMerge)
		}
		h.shard = Whole
		if string(h.bytes()) != string(want) {
			info := r.info()
			info.Shard = Whole
			return nil, fmt.Errorf("grid: merge: %s and %s were written for different grids (%s): %w",
				parts[0], parts[i], differs(info, &whole), ErrMerge)
		}
		if prev := byIndex[r.h.shard.Index]; prev != nil {
			return nil, fmt.Errorf("grid: merge: %s and %s are both shard %s: %w", prev.name, r.name, r.h.shard, ErrMerge)
		}
		byIndex[r.h.shard.Index] = r
	}
	var missing []string
	for i, r := range byIndex {
		if r == nil {
			missing = append(missing, fmt.Sprintf("%d/%d", i, n))
		}
	}
	if len(missing) > 0 {
		sort.Strings(missing)
		shown := missing
		if len(shown) > 10 {
			shown = append(shown[:10:10], "…")
		}
		return nil, fmt.Errorf("grid: merge: %d of %d shards missing: %s: %w", len(missing), n, strings.Join(shown, ", "), ErrMerge)
	}

	dir := filepath.Dir(out)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(out)+".tmp*")
	if err != nil {
		return nil, fmt.Errorf("grid: merge: %w", err)
	}
	defer func() {
		if tmp != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	w := newSumWriter(tmp)
	w.Write(want)
	total := whole.spec.points * whole.rowsPerPoint()
	failed := 0
	for k := range whole.spec.points {
		r := byIndex[k%n]
		for range whole.rowsPerPoint() {
			b, err := r.nextRow()
			if err == nil && b == nil {
				err = fmt.Errorf("grid: %s: ends before point %d: %w", r.name, k, ErrPart)
			}
			if err != nil {
				return nil, mergeErr(err)
			}
			w.Write(b)
		}
	}
	for _, r := range byIndex {
		b, err := r.nextRow()
		if err == nil && b != nil {
			err = r.errf("a row after the shard's last point")
		}
		if err != nil {
			return nil, mergeErr(err)
		}
		failed += r.failed
	}
	w.end(total)
	if w.err != nil {
		return nil, fmt.Errorf("grid: merge: writing %s: %w", out, w.err)
	}
	if err := tmp.Chmod(0o644); err != nil {
		return nil, fmt.Errorf("grid: merge: %w", err)
	}
	if err := tmp.Sync(); err != nil {
		return nil, fmt.Errorf("grid: merge: %w", err)
	}
	if err := tmp.Close(); err != nil {
		return nil, fmt.Errorf("grid: merge: %w", err)
	}
	if err := os.Rename(tmp.Name(), out); err != nil {
		return nil, fmt.Errorf("grid: merge: %w", err)
	}
	tmp = nil
	info := first.info()
	info.Shard, info.Rows, info.Failed = Whole, total, failed
	return info, nil
}

func mergeErr(err error) error {
	if errors.Is(err, ErrIncomplete) {
		return fmt.Errorf("grid: merge: a part is incomplete: %w", err)
	}
	return fmt.Errorf("grid: merge: %w", err)
}
