package linelists

import (
	"encoding/binary"
	"encoding/json"
	"fmt"
	"hash/crc32"
	"hash/fnv"
	"io"
	"math"
	"os"
	"path/filepath"
	"unsafe"
)

// The binary cache holds one parsed file as a Store that loads with a
// single read. Layout (little-endian):
//
//	header (cacheHeaderSize bytes): magic, version, source identity
//	  (size, mtime, FNV-1a hash of its first 64 KiB, hash of the read
//	  options), counts, length of the report blob
//	report blob: the FileReport as JSON (bounded)
//	arrays, each starting at a multiple of 8: Wavelength float64, Lower
//	  uint32, LogGF float32, Species uint16, SpeciesTable (Z, Charge),
//	  LevelOrigin uint8, Levels.Energy float64, Levels.Species uint16,
//	  Levels.G float32, levelStart uint32
//	trailer: CRC-32C of everything before it (4 bytes)
//
// Sizes are checked against the file's length before anything is
// allocated; a wrong magic, version, identity, size or checksum, or an
// index out of range, makes the cache unusable (ErrCache) and it is rebuilt.
const (
	cacheMagic = "BLLINES\x00"
	// cacheVersion 2: the report's medium is written by name
	// (physics.Medium), and air wavelengths are converted by
	// physics.AirToVacuum, which can differ from the former conversion in
	// the last bit. 3: the readers reject values outside the physical
	// ranges of ranges.go, so a cache made from a file that now fails must
	// not stand in for it.
	cacheVersion    = 3
	cacheHeaderSize = 96
	cacheMaxReport  = 1 << 20
	cacheHeadBytes  = 64 << 10
)

var castagnoli = crc32.MakeTable(crc32.Castagnoli)

// sourceID identifies the source file a cache was made from.
type sourceID struct {
	Size    int64
	ModTime int64 // ns since 1970
	Head    uint64
	Options uint64
}

func identify(path string, optsHash uint64) (sourceID, error) {
	f, err := os.Open(path)
	if err != nil {
		return sourceID{}, err
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return sourceID{}, err
	}
	h := fnv.New64a()
	if _, err := io.CopyN(h, f, cacheHeadBytes); err != nil && err != io.EOF {
		return sourceID{}, err
	}
	return sourceID{Size: fi.Size(), ModTime: fi.ModTime().UnixNano(), Head: h.Sum64(), Options: optsHash}, nil
}

type cacheCounts struct {
	lines, species, levels uint64
	report                 uint64
}

// cacheLayout returns the offsets of the arrays and the total size.
func cacheLayout(c cacheCounts) (off [11]uint64, total uint64, ok bool) {
	const maxN = 1 << 40
	if c.lines > maxN || c.species > 1<<16 || c.levels > 1<<32 || c.report > cacheMaxReport {
		return off, 0, false
	}
	sizes := [10]uint64{
		8 * c.lines, 4 * c.lines, 4 * c.lines, 2 * c.lines,
		2 * c.species, c.species,
		8 * c.levels, 2 * c.levels, 4 * c.levels,
		4 * (c.species + 1),
	}
	p := align8(cacheHeaderSize + c.report)
	for i, s := range sizes {
		off[i] = p
		p = align8(p + s)
	}
	off[10] = p
	return off, p + 8, true
}

func align8(x uint64) uint64 { return (x + 7) &^ 7 }

// writeCache writes s and its report to path (atomically, via a temporary
// file and a rename).
func writeCache(path string, s *Store, fr FileReport, id sourceID) error {
	rep, err := json.Marshal(fr)
	if err != nil {
		return err
	}
	if len(rep) > cacheMaxReport {
		rep, _ = json.Marshal(FileReport{Name: fr.Name, Medium: fr.Medium, Rows: fr.Rows, Added: fr.Added, Skipped: fr.Skipped})
	}
	ls := s.levelStart
	if ls == nil {
		ls = groupStarts(s.Levels.Species, len(s.SpeciesTable))
		if ls == nil {
			return fmt.Errorf("linelists: cache: level table not grouped by species")
		}
	}
	origin := make([]byte, len(s.SpeciesTable))
	for i := range origin {
		if i < len(s.LevelOrigin) {
			origin[i] = byte(s.LevelOrigin[i])
		}
	}
	c := cacheCounts{uint64(s.Len()), uint64(len(s.SpeciesTable)), uint64(len(s.Levels.Energy)), uint64(len(rep))}
	off, total, ok := cacheLayout(c)
	if !ok {
		return fmt.Errorf("linelists: cache: store too large")
	}
	buf := make([]byte, total)
	copy(buf, cacheMagic)
	le := binary.LittleEndian
	le.PutUint32(buf[8:], cacheVersion)
	le.PutUint64(buf[16:], uint64(id.Size))
	le.PutUint64(buf[24:], uint64(id.ModTime))
	le.PutUint64(buf[32:], id.Head)
	le.PutUint64(buf[40:], id.Options)
	le.PutUint64(buf[48:], c.lines)
	le.PutUint64(buf[56:], c.species)
	le.PutUint64(buf[64:], c.levels)
	le.PutUint64(buf[72:], c.report)
	copy(buf[cacheHeaderSize:], rep)
	put := func(o uint64, n int, f func(b []byte, i int)) {
		for i := 0; i < n; i++ {
			f(buf[o:], i)
		}
	}
	put(off[0], s.Len(), func(b []byte, i int) { le.PutUint64(b[8*i:], math.Float64bits(s.Wavelength[i])) })
	put(off[1], s.Len(), func(b []byte, i int) { le.PutUint32(b[4*i:], s.Lower[i]) })
	put(off[2], s.Len(), func(b []byte, i int) { le.PutUint32(b[4*i:], math.Float32bits(s.LogGF[i])) })
	put(off[3], s.Len(), func(b []byte, i int) { le.PutUint16(b[2*i:], s.Species[i]) })
	put(off[4], len(s.SpeciesTable), func(b []byte, i int) { b[2*i], b[2*i+1] = s.SpeciesTable[i].Z, s.SpeciesTable[i].Charge })
	copy(buf[off[5]:], origin)
	nl := len(s.Levels.Energy)
	put(off[6], nl, func(b []byte, i int) { le.PutUint64(b[8*i:], math.Float64bits(s.Levels.Energy[i])) })
	put(off[7], nl, func(b []byte, i int) { le.PutUint16(b[2*i:], s.Levels.Species[i]) })
	put(off[8], nl, func(b []byte, i int) { le.PutUint32(b[4*i:], math.Float32bits(s.Levels.G[i])) })
	put(off[9], len(ls), func(b []byte, i int) { le.PutUint32(b[4*i:], ls[i]) })
	le.PutUint32(buf[off[10]:], crc32.Checksum(buf[:off[10]], castagnoli))

	tmp, err := os.CreateTemp(filepath.Dir(path), ".blcache-*")
	if err != nil {
		return err
	}
	if _, err := tmp.Write(buf); err != nil {
		tmp.Close()
		os.Remove(tmp.Name())
		return err
	}
	if err := tmp.Close(); err != nil {
		os.Remove(tmp.Name())
		return err
	}
	if err := os.Rename(tmp.Name(), path); err != nil {
		os.Remove(tmp.Name())
		return err
	}
	return nil
}

// readCache loads a cache file with one read and checks it against the
// source identity. Any problem returns an error wrapping ErrCache.
func readCache(path string, id sourceID) (*Store, FileReport, error) {
	var fr FileReport
	bad := func(format string, a ...any) error {
		return &ParseError{File: path, Err: fmt.Errorf("%w: "+format, append([]any{ErrCache}, a...)...)}
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, fr, err
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return nil, fr, err
	}
	size := fi.Size()
	if size < cacheHeaderSize+8 {
		return nil, fr, bad("file too short (%d bytes)", size)
	}
	var hdr [cacheHeaderSize]byte
	if _, err := io.ReadFull(f, hdr[:]); err != nil {
		return nil, fr, bad("header: %v", err)
	}
	le := binary.LittleEndian
	if string(hdr[:8]) != cacheMagic {
		return nil, fr, bad("not a line-list cache")
	}
	if v := le.Uint32(hdr[8:]); v != cacheVersion {
		return nil, fr, bad("version %d, this program writes %d", v, cacheVersion)
	}
	got := sourceID{int64(le.Uint64(hdr[16:])), int64(le.Uint64(hdr[24:])), le.Uint64(hdr[32:]), le.Uint64(hdr[40:])}
	if got != id {
		return nil, fr, bad("stale: the source file or the read options changed")
	}
	c := cacheCounts{le.Uint64(hdr[48:]), le.Uint64(hdr[56:]), le.Uint64(hdr[64:]), le.Uint64(hdr[72:])}
	off, total, ok := cacheLayout(c)
	if !ok || total != uint64(size) {
		return nil, fr, bad("size %d does not match its counts", size)
	}
	// One read of the whole file into a buffer the slices will share,
	// allocated as []uint64 so that every array is 8-byte aligned.
	words := make([]uint64, total/8)
	buf := unsafe.Slice((*byte)(unsafe.Pointer(&words[0])), total)
	copy(buf, hdr[:])
	if _, err := io.ReadFull(f, buf[cacheHeaderSize:]); err != nil {
		return nil, fr, bad("reading: %v", err)
	}
	if sum := crc32.Checksum(buf[:off[10]], castagnoli); sum != le.Uint32(buf[off[10]:]) {
		return nil, fr, bad("checksum mismatch (corrupt)")
	}
	if err := json.Unmarshal(buf[cacheHeaderSize:cacheHeaderSize+c.report], &fr); err != nil {
		return nil, fr, bad("report: %v", err)
	}
	n, ns, nl := int(c.lines), int(c.species), int(c.levels)
	s := &Store{}
	if littleEndian() {
		s.Wavelength = view[float64](buf, off[0], n)
		s.Lower = view[uint32](buf, off[1], n)
		s.LogGF = view[float32](buf, off[2], n)
		s.Species = view[uint16](buf, off[3], n)
		s.Levels.Energy = view[float64](buf, off[6], nl)
		s.Levels.Species = view[uint16](buf, off[7], nl)
		s.Levels.G = view[float32](buf, off[8], nl)
		s.levelStart = view[uint32](buf, off[9], ns+1)
	} else {
		s.Wavelength = make([]float64, n)
		s.Lower = make([]uint32, n)
		s.LogGF = make([]float32, n)
		s.Species = make([]uint16, n)
		for i := 0; i < n; i++ {
			s.Wavelength[i] = math.Float64frombits(le.Uint64(buf[off[0]+8*uint64(i):]))
			s.Lower[i] = le.Uint32(buf[off[1]+4*uint64(i):])
			s.LogGF[i] = math.Float32frombits(le.Uint32(buf[off[2]+4*uint64(i):]))
			s.Species[i] = le.Uint16(buf[off[3]+2*uint64(i):])
		}
		s.Levels = LevelTable{make([]uint16, nl), make([]float64, nl), make([]float32, nl)}
		for i := 0; i < nl; i++ {
			s.Levels.Energy[i] = math.Float64frombits(le.Uint64(buf[off[6]+8*uint64(i):]))
			s.Levels.Species[i] = le.Uint16(buf[off[7]+2*uint64(i):])
			s.Levels.G[i] = math.Float32frombits(le.Uint32(buf[off[8]+4*uint64(i):]))
		}
		s.levelStart = make([]uint32, ns+1)
		for i := range s.levelStart {
			s.levelStart[i] = le.Uint32(buf[off[9]+4*uint64(i):])
		}
	}
	s.SpeciesTable = make([]Species, ns)
	s.LevelOrigin = make([]LevelSource, ns)
	for i := 0; i < ns; i++ {
		sp := Species{Z: buf[off[4]+2*uint64(i)], Charge: buf[off[4]+2*uint64(i)+1]}
		if sp.Z < 1 || sp.Z > 100 || sp.Charge > sp.Z {
			return nil, fr, bad("invalid species %d", i)
		}
		s.SpeciesTable[i] = sp
		if o := LevelSource(buf[off[5]+uint64(i)]); o <= FileLevels {
			s.LevelOrigin[i] = o
		} else {
			return nil, fr, bad("invalid level origin")
		}
	}
	if err := s.Check(); err != nil {
		return nil, fr, bad("%v", err)
	}
	fr.Cached = true
	return s, fr, nil
}

func view[T any](buf []byte, off uint64, n int) []T {
	if n == 0 {
		return []T{}
	}
	return unsafe.Slice((*T)(unsafe.Pointer(&buf[off])), n)
}

func littleEndian() bool {
	x := uint16(1)
	return *(*byte)(unsafe.Pointer(&x)) == 1
}

// Check returns an error when s breaks an invariant that every Store from
// this package keeps (lines sorted by wavelength, indices in range, levels
// grouped by species), so that a damaged cache or a store assembled by hand
// cannot send an index out of range.
func (s *Store) Check() error {
	ns, nl := len(s.SpeciesTable), len(s.Levels.Energy)
	if n := len(s.Wavelength); len(s.LogGF) != n || len(s.Species) != n || len(s.Lower) != n {
		return fmt.Errorf("per-line slices differ in length")
	}
	if len(s.Levels.Species) != nl {
		return fmt.Errorf("per-level slices differ in length")
	}
	if s.levelStart != nil && (len(s.levelStart) != ns+1 || s.levelStart[0] != 0 || int(s.levelStart[ns]) != nl) {
		return fmt.Errorf("level index broken")
	}
	for i := 0; s.levelStart != nil && i < ns; i++ {
		lo, hi := s.levelStart[i], s.levelStart[i+1]
		if hi < lo {
			return fmt.Errorf("level index not increasing")
		}
		for l := lo; l < hi; l++ {
			if int(s.Levels.Species[l]) != i {
				return fmt.Errorf("level %d in the wrong species group", l)
			}
		}
	}
	for _, e := range s.Levels.Energy {
		if !(e >= 0) || math.IsInf(e, 0) {
			return fmt.Errorf("level energy %v", e)
		}
	}
	prev := 0.0
	for i, w := range s.Wavelength {
		if !(w >= prev) || math.IsInf(w, 0) || int(s.Lower[i]) >= nl || int(s.Species[i]) >= ns {
			return fmt.Errorf("line %d out of order or out of range", i)
		}
		if s.Levels.Species[s.Lower[i]] != s.Species[i] {
			return fmt.Errorf("line %d: lower level of another species", i)
		}
		prev = w
	}
	return nil
}

// optionsHash hashes what changes the parse of a file.
func optionsHash(o *Options) uint64 {
	h := fnv.New64a()
	fmt.Fprintf(h, "v%d medium=%d keepdup=%v species=%v", cacheVersion, o.Medium, o.KeepDuplicates, o.Species)
	if o.Import != nil {
		b, _ := json.Marshal(o.Import)
		h.Write(b)
	}
	return h.Sum64()
}
