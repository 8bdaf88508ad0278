package linelists

import (
	"bytes"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"testing"
)

// benchText returns an n-line file of our format with realistic fields:
// 48 species with 2000 lower levels each (a level keeps its energy and g
// in every line that names it, as in real lists), wavelengths 3500–25000 Å.
func benchText(n int) []byte {
	rng := rand.New(rand.NewPCG(1, 2))
	var b bytes.Buffer
	b.Grow(n * 48)
	b.WriteString("# benchmark list, invented\n# medium: vacuum\nwavelength_A species log_gf lower_energy_eV lower_g\n")
	names := []string{}
	for z := 56; z <= 71; z++ {
		for c := 0; c < 3; c++ {
			names = append(names, fmt.Sprintf("%s_%s", elements[z].Symbol, Roman(c+1)))
		}
	}
	buf := make([]byte, 0, 64)
	for i := 0; i < n; i++ {
		buf = strconv.AppendFloat(buf[:0], 3500+21500*rng.Float64(), 'f', 4, 64)
		buf = append(buf, ' ')
		buf = append(buf, names[rng.IntN(len(names))]...)
		buf = append(buf, ' ')
		buf = strconv.AppendFloat(buf, -2.3+1.2*rng.NormFloat64(), 'f', 3, 64)
		buf = append(buf, ' ')
		lv := rng.IntN(2000)
		buf = strconv.AppendFloat(buf, float64(lv)*0.003, 'f', 4, 64)
		buf = append(buf, ' ')
		buf = strconv.AppendInt(buf, int64(1+2*(lv%9)), 10)
		buf = append(buf, '\n')
		b.Write(buf)
	}
	return b.Bytes()
}

// BenchmarkParse1M reads a 1-million-line text file into a Store (parse,
// level deduplication, sort), serially and with one worker per CPU. Goal:
// ≥ 1e6 lines/s on the 2-core machine.
func BenchmarkParse1M(b *testing.B) {
	const n = 1_000_000
	data := benchText(n)
	for _, w := range []int{1, runtime.GOMAXPROCS(0)} {
		b.Run(fmt.Sprintf("workers=%d", w), func(b *testing.B) {
			b.SetBytes(int64(len(data)))
			b.ReportAllocs()
			for i := 0; i < b.N; i++ {
				s, _, err := Read(bytes.NewReader(data), ReadOptions{Workers: w})
				if err != nil || s.Len() < n*9/10 {
					b.Fatal(err, s.Len())
				}
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "lines/s")
		})
	}
}

// bigStore builds an n-line store directly (not through the parser).
func bigStore(n int) *Store {
	rng := rand.New(rand.NewPCG(3, 4))
	s := &Store{}
	const ns, perSp = 40, 5000
	for i := 0; i < ns; i++ {
		s.SpeciesTable = append(s.SpeciesTable, Species{Z: uint8(56 + i/3), Charge: uint8(i % 3)})
		s.LevelOrigin = append(s.LevelOrigin, LineLevels)
		for l := 0; l < perSp; l++ {
			s.Levels.Species = append(s.Levels.Species, uint16(i))
			s.Levels.Energy = append(s.Levels.Energy, float64(l)*0.001)
			s.Levels.G = append(s.Levels.G, float32(1+2*(l%9)))
		}
	}
	s.levelStart = groupStarts(s.Levels.Species, ns)
	s.Wavelength = make([]float64, n)
	s.LogGF = make([]float32, n)
	s.Species = make([]uint16, n)
	s.Lower = make([]uint32, n)
	for i := 0; i < n; i++ {
		sp := rng.IntN(ns)
		s.Wavelength[i] = 3500 + 21500*float64(i)/float64(n)
		s.LogGF[i] = float32(-2.3 + 1.2*rng.NormFloat64())
		s.Species[i] = uint16(sp)
		s.Lower[i] = uint32(sp*perSp + rng.IntN(perSp))
	}
	return s
}

// BenchmarkCacheLoad10M loads a 10-million-line store from its binary
// cache. Goals: ≤ 0.5 s per load and ≤ 32 bytes per line resident.
func BenchmarkCacheLoad10M(b *testing.B) {
	const n = 10_000_000
	dir := b.TempDir()
	src := filepath.Join(dir, "big.txt")
	os.WriteFile(src, []byte("placeholder source\n"), 0o644)
	id, err := identify(src, 0)
	if err != nil {
		b.Fatal(err)
	}
	cp := src + cacheSuffix
	s := bigStore(n)
	if err := writeCache(cp, s, FileReport{Name: src}, id); err != nil {
		b.Fatal(err)
	}
	s = nil
	runtime.GC()
	var before, after runtime.MemStats
	b.ReportAllocs()
	b.ResetTimer()
	var kept *Store
	for i := 0; i < b.N; i++ {
		kept = nil
		runtime.GC()
		runtime.ReadMemStats(&before)
		got, _, err := readCache(cp, id)
		if err != nil || got.Len() != n {
			b.Fatal(err)
		}
		kept = got
		runtime.ReadMemStats(&after)
	}
	b.StopTimer()
	runtime.GC()
	var live runtime.MemStats
	runtime.ReadMemStats(&live)
	b.ReportMetric(b.Elapsed().Seconds()/float64(b.N), "s/load")
	b.ReportMetric(float64(after.HeapAlloc-before.HeapAlloc)/n, "bytes/line")
	b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "lines/s")
	runtime.KeepAlive(kept)
}
