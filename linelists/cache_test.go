package linelists

import (
	"encoding/binary"
	"errors"
	"hash/crc32"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"

	"broadline/physics"
)

func writeTemp(t *testing.T, name, content string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func sameStore(t *testing.T, a, b *Store) {
	t.Helper()
	if !reflect.DeepEqual(a.Wavelength, b.Wavelength) || !reflect.DeepEqual(a.LogGF, b.LogGF) ||
		!reflect.DeepEqual(a.Species, b.Species) || !reflect.DeepEqual(a.Lower, b.Lower) ||
		!reflect.DeepEqual(a.SpeciesTable, b.SpeciesTable) || !reflect.DeepEqual(a.Levels, b.Levels) ||
		!reflect.DeepEqual(a.LevelOrigin, b.LevelOrigin) || !reflect.DeepEqual(a.levelStart, b.levelStart) {
		t.Error("stores differ")
	}
}

func TestCacheRoundTrip(t *testing.T) {
	src := writeTemp(t, "list.txt", sample)
	s1, r1, err := Load([]string{src}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if r1.Files[0].Cached {
		t.Error("first load claims the cache")
	}
	if _, err := os.Stat(src + cacheSuffix); err != nil {
		t.Fatalf("no cache next to the file: %v", err)
	}
	s2, r2, err := Load([]string{src}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if !r2.Files[0].Cached || len(r2.Warnings) != 0 {
		t.Errorf("second load: cached=%v warnings %v", r2.Files[0].Cached, r2.Warnings)
	}
	sameStore(t, s1, s2)
	if !reflect.DeepEqual(r1.Files[0].Meta, r2.Files[0].Meta) || r2.Files[0].Medium != physics.Air || r2.Files[0].Rows != 4 {
		t.Errorf("report not restored: %+v", r2.Files[0])
	}
	// Partition functions work on the loaded store (grouped levels).
	u1, _ := s1.PartitionFunction(MustSpecies("Ca II"), 5000)
	u2, _ := s2.PartitionFunction(MustSpecies("Ca II"), 5000)
	if u1 != u2 {
		t.Errorf("U %v vs %v", u1, u2)
	}
}

func TestCacheStaleAndCorrupt(t *testing.T) {
	src := writeTemp(t, "list.txt", sample)
	ref, _, err := Load([]string{src}, Options{Cache: CacheOff})
	if err != nil {
		t.Fatal(err)
	}
	if _, _, err := Load([]string{src}, Options{}); err != nil {
		t.Fatal(err)
	}
	cp := src + cacheSuffix
	good, _ := os.ReadFile(cp)
	for _, tc := range []struct {
		name   string
		damage func([]byte) []byte
		want   string
	}{
		{"flipped byte", func(b []byte) []byte { b[len(b)/2] ^= 0x40; return b }, "checksum"},
		{"truncated", func(b []byte) []byte { return b[:len(b)-9] }, "does not match its counts"},
		{"huge count", func(b []byte) []byte { binary.LittleEndian.PutUint64(b[48:], 1<<50); return b }, "does not match its counts"},
		{"version", func(b []byte) []byte { b[8] = 99; return b }, "version 99"},
		{"magic", func(b []byte) []byte { b[0] = 'X'; return b }, "not a line-list cache"},
		{"empty", func(b []byte) []byte { return nil }, "too short"},
	} {
		d := tc.damage(append([]byte(nil), good...))
		if err := os.WriteFile(cp, d, 0o644); err != nil {
			t.Fatal(err)
		}
		s, rep, err := Load([]string{src}, Options{})
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		if rep.Files[0].Cached || len(rep.Warnings) != 1 || !strings.Contains(rep.Warnings[0], tc.want) {
			t.Errorf("%s: cached=%v warnings %v, want one saying %q", tc.name, rep.Files[0].Cached, rep.Warnings, tc.want)
		}
		sameStore(t, ref, s)
		// The cache was rebuilt and is good again.
		if b, _ := os.ReadFile(cp); string(b) != string(good) {
			t.Errorf("%s: cache not rebuilt", tc.name)
		}
	}
	// The source changes: the cache is stale, never used.
	time.Sleep(10 * time.Millisecond)
	changed := strings.Replace(sample, "-0.360", "-0.400", 1)
	os.WriteFile(src, []byte(changed), 0o644)
	s, rep, err := Load([]string{src}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Files[0].Cached || !strings.Contains(strings.Join(rep.Warnings, ""), "stale") {
		t.Errorf("changed source: cached=%v warnings %v", rep.Files[0].Cached, rep.Warnings)
	}
	if s.LogGF[1] != -0.4 {
		t.Errorf("changed source not re-read: log gf %v", s.LogGF[1])
	}
	// Other read options make the cache stale too.
	_, rep, err = Load([]string{src}, Options{Medium: physics.Air})
	if err != nil || rep.Files[0].Cached {
		t.Errorf("new options: cached=%v err %v", rep.Files[0].Cached, err)
	}
}

func TestCacheDir(t *testing.T) {
	src := writeTemp(t, "list.txt", sample)
	dir := t.TempDir()
	if _, _, err := Load([]string{src}, Options{CacheDir: dir}); err != nil {
		t.Fatal(err)
	}
	m, _ := filepath.Glob(filepath.Join(dir, "list.txt-*"+cacheSuffix))
	if len(m) != 1 {
		t.Errorf("caches in dir: %v", m)
	}
	if _, err := os.Stat(src + cacheSuffix); err == nil {
		t.Error("cache written next to the file although CacheDir was set")
	}
	_, rep, _ := Load([]string{src}, Options{CacheDir: dir})
	if !rep.Files[0].Cached {
		t.Error("cache in CacheDir not used")
	}
}

func TestLoadMergeLevelsFilter(t *testing.T) {
	a := writeTemp(t, "a.txt", sample)
	b := writeTemp(t, "b.txt", sample) // the same lines again: duplicates
	lv := writeTemp(t, "lv.txt", "species energy_cm-1 j\nCa_II 0 0.5\nCa_II 13650.19 1.5\nCa_II 13710.88 2.5\nCa_II 25191.51 0.5\nCa_II 25414.40 1.5\n")
	s, rep, err := Load([]string{a, b}, Options{Levels: []string{lv}, Filter: Filter{MaxWavelength: 9000}, Cache: CacheOff})
	if err != nil {
		t.Fatal(err)
	}
	if s.Len() != 3 || rep.Duplicates != 4 || rep.Skipped.Wavelength != 1 {
		t.Errorf("%d lines, %d duplicates, %+v skipped", s.Len(), rep.Duplicates, rep.Skipped)
	}
	if s.LevelSourceOf(MustSpecies("Ca II")) != FileLevels || s.LevelSourceOf(MustSpecies("Sr II")) != LineLevels {
		t.Error("level sources wrong")
	}
	if _, _, err := Load([]string{a, filepath.Join(t.TempDir(), "missing.txt")}, Options{}); err == nil || !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: %v", err)
	}
	bad := writeTemp(t, "bad.txt", "wavelength_A species log_gf lower_energy_eV\n5000 Nd_II x 0\n")
	_, _, err = Load([]string{bad}, Options{})
	var pe *ParseError
	if !errors.As(err, &pe) || pe.Line != 2 || pe.Column != 3 || pe.File != bad {
		t.Errorf("bad file: %v", err)
	}
}

// FuzzCacheMutation damages a valid cache at a chosen byte, fixes the
// checksum so the damage gets past it, and checks that loading either
// refuses the cache or returns a store that keeps every invariant.
func FuzzCacheMutation(f *testing.F) {
	f.Add(uint32(100), byte(0xff))
	f.Add(uint32(600), byte(1))
	f.Add(uint32(48), byte(3))
	f.Fuzz(func(t *testing.T, pos uint32, val byte) {
		dir := t.TempDir()
		src := filepath.Join(dir, "l.txt")
		os.WriteFile(src, []byte(sample), 0o644)
		id, err := identify(src, 0)
		if err != nil {
			t.Fatal(err)
		}
		s, fr, err := Read(strings.NewReader(sample), ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		cp := src + cacheSuffix
		if err := writeCache(cp, s, fr.Files[0], id); err != nil {
			t.Fatal(err)
		}
		b, _ := os.ReadFile(cp)
		if len(b) < 8 {
			t.Fatal("short cache")
		}
		p := int(pos) % (len(b) - 8)
		b[p] = val
		binary.LittleEndian.PutUint32(b[len(b)-8:], crc32.Checksum(b[:len(b)-8], castagnoli))
		os.WriteFile(cp, b, 0o644)
		got, _, err := readCache(cp, id)
		if err != nil {
			if !errors.Is(err, ErrCache) && !errors.Is(err, os.ErrNotExist) {
				t.Fatalf("error %v does not wrap ErrCache", err)
			}
			return
		}
		checkStore(t, got)
	})
}

func writeFile(t *testing.T, p, content string) {
	t.Helper()
	if err := os.WriteFile(p, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
}
