package grid

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync/atomic"
	"testing"
)

// fake is a deterministic stand-in for the model: a smooth function of the
// point (a paraboloid in velocity and temperature, growing with the
// fraction), failing at every 37th point from 13 on (an invented failure,
// to check that failures are recorded).
type fake struct {
	epochs int
	waves  []float64
	calls  atomic.Int64
}

func (f *fake) Evaluate(ctx context.Context, p Point) (Result, error) {
	f.calls.Add(1)
	if p.Index%37 == 13 {
		return Result{}, fmt.Errorf("invented failure at point %d, with \"quotes\", commas\nand a new line", p.Index)
	}
	v, _ := p.Get("velocity")
	T, _ := p.Get("temperature")
	x, _ := p.Get("fraction_Nd")
	var res Result
	for e := range f.epochs {
		c := 1 + 100*(v-0.2)*(v-0.2) + (T-4000)*(T-4000)/1e6 + 10*x + 0.1*float64(e)
		res.Epochs = append(res.Epochs, EpochFit{Chi2N: c, N: 800 + 3*e + p.Index%5})
		if f.waves != nil {
			flux := make([]float64, len(f.waves))
			for i, w := range f.waves {
				flux[i] = 1 + v*math.Sin(w/1000+float64(e)) - x
			}
			res.Spectra = append(res.Spectra, flux)
		}
	}
	return res, nil
}

func testOptions(epochs int) Options {
	labels := make([]string, epochs)
	for i := range labels {
		labels[i] = "e" + strconv.Itoa(i+1)
	}
	return Options{
		Inputs: Inputs{Program: "broadline test", Files: []InputFile{
			{Role: "dataset", Name: "invented/set.json", SHA256: strings.Repeat("ab", 32)},
			{Role: "linelist", Name: "invented/lines with spaces.txt", SHA256: strings.Repeat("0c", 32)},
		}},
		Epochs: labels,
	}
}

func writeBytes(t testing.TB, s *Spec, sh Shard, ev Evaluator, opt Options) ([]byte, []byte, *Report) {
	t.Helper()
	var chi, spc bytes.Buffer
	rep, err := Write(context.Background(), s, sh, ev, &chi, &spc, opt)
	if err != nil {
		t.Fatal(err)
	}
	return chi.Bytes(), spc.Bytes(), rep
}

// TestWriteDeterministic: the bytes do not depend on the number of workers,
// the part reads back valid, and every row holds the evaluator's values.
func TestWriteDeterministic(t *testing.T) {
	s := mustSpec(t, exampleSpec)
	opt := testOptions(2)
	opt.Wavelengths = []float64{4000, 4000.5, 9000}
	ev := &fake{epochs: 2, waves: opt.Wavelengths}
	var ref, refSpec []byte
	for _, w := range []int{1, 2, 7, 0} {
		opt.Workers = w
		chi, spc, rep := writeBytes(t, s, Whole, ev, opt)
		if ref == nil {
			ref, refSpec = chi, spc
			// Points 13 and 50 fail.
			if rep.Points != 60 || rep.Failed != 2 {
				t.Errorf("report %+v, want 60 points, 2 failed", rep)
			}
		} else if !bytes.Equal(chi, ref) || !bytes.Equal(spc, refSpec) {
			t.Fatalf("%d workers wrote other bytes than 1 worker", w)
		}
	}
	info, err := ReadPart(bytes.NewReader(ref), "whole.csv")
	if err != nil {
		t.Fatal(err)
	}
	if info.Rows != 60 || info.Failed != 2 || info.Kind != KindChi2 || info.Shard != Whole {
		t.Errorf("info %+v", info)
	}
	sinfo, err := ReadPart(bytes.NewReader(refSpec), "whole.spectra.csv")
	if err != nil {
		t.Fatal(err)
	}
	if sinfo.Rows != 120 || sinfo.Failed != 2 || sinfo.Kind != KindSpectra {
		t.Errorf("spectra info %+v", sinfo)
	}
	// Every value read back equals the evaluator's, bit for bit.
	lines := strings.Split(string(ref), "\n")
	var rows []string
	for _, l := range lines {
		if l != "" && !strings.HasPrefix(l, "#") {
			rows = append(rows, l)
		}
	}
	if rows[0] != "point,velocity,temperature,fraction_Nd,chi2n,chi2n_e1,n_e1,chi2n_e2,n_e2,error" {
		t.Errorf("header row %q", rows[0])
	}
	for _, row := range rows[1:] {
		f := strings.Split(row, ",")
		k, _ := strconv.Atoi(f[0])
		p := s.Point(k)
		res, err := ev.Evaluate(context.Background(), p)
		if err != nil {
			if !strings.Contains(row, `"invented failure at point 13, with ""quotes"", commas and a new line"`) &&
				!strings.Contains(row, "at point 50") {
				t.Errorf("failed row %q", row)
			}
			continue
		}
		for i := range 3 {
			if x, _ := strconv.ParseFloat(f[1+i], 64); x != p.Values[i] {
				t.Errorf("point %d axis %d: %s, want %v", k, i, f[1+i], p.Values[i])
			}
		}
		for e := range 2 {
			x, _ := strconv.ParseFloat(f[5+2*e], 64)
			n, _ := strconv.Atoi(f[6+2*e])
			if x != res.Epochs[e].Chi2N || n != res.Epochs[e].N {
				t.Errorf("point %d epoch %d: %s %s, want %v %d", k, e, f[5+2*e], f[6+2*e], res.Epochs[e].Chi2N, res.Epochs[e].N)
			}
		}
		// The combined χ²/N is Σχ²/ΣN.
		want := (res.Epochs[0].Chi2N*float64(res.Epochs[0].N) + res.Epochs[1].Chi2N*float64(res.Epochs[1].N)) / float64(res.Epochs[0].N+res.Epochs[1].N)
		if x, _ := strconv.ParseFloat(f[4], 64); math.Abs(x-want) > 1e-15*want {
			t.Errorf("point %d: combined %s, want %v", k, f[4], want)
		}
	}
	if len(rows) != 61 {
		t.Errorf("%d rows, want 60 and the header", len(rows)-1)
	}
}

func TestCheckResult(t *testing.T) {
	s := mustSpec(t, `{"format":"broadline-grid/1","axes":[{"quantity":"epoch","values":[0,1,2]}]}`)
	opt := testOptions(2)
	bad := EvaluatorFunc(func(_ context.Context, p Point) (Result, error) {
		switch p.Index {
		case 0:
			return Result{Epochs: []EpochFit{{1, 2}}}, nil
		case 1:
			return Result{Epochs: []EpochFit{{1, 2}, {1, -1}}}, nil
		}
		return Result{Epochs: []EpochFit{{1, 2}, {3, 4}}}, nil
	})
	chi, _, rep := writeBytes(t, s, Whole, bad, opt)
	if rep.Failed != 2 {
		t.Errorf("failed %d, want 2", rep.Failed)
	}
	for _, want := range []string{"0,0,,,,,,\"evaluator returned 1 epoch fits, want 2\"\n", "1,1,,,,,,evaluator returned N = -1 for epoch 2\n", "2,2," + formatFloat((1*2+3*4)/6.0) + ",1,2,3,4,\n"} {
		if !bytes.Contains(chi, []byte(want)) {
			t.Errorf("no row %q in\n%s", want, chi)
		}
	}
}

func runShards(t *testing.T, dir string, s *Spec, n int, ev Evaluator, opt Options) []string {
	t.Helper()
	var parts []string
	for i := range n {
		p := filepath.Join(dir, fmt.Sprintf("part-%d.csv", i))
		if _, err := Run(context.Background(), s, Shard{i, n}, ev, p, opt); err != nil {
			t.Fatal(err)
		}
		parts = append(parts, p)
	}
	return parts
}

// TestMergeBitForBit: the merged parts are the unsharded run's file, byte
// for byte, for several splits (including more shards than points).
func TestMergeBitForBit(t *testing.T) {
	small := mustSpec(t, `{"format":"broadline-grid/1","axes":[{"quantity":"velocity","values":[0.1,0.2,0.3,0.15,0.25]}]}`)
	for _, c := range []struct {
		spec *Spec
		n    int
	}{{mustSpec(t, exampleSpec), 4}, {mustSpec(t, exampleSpec), 7}, {mustSpec(t, exampleSpec), 1}, {small, 8}} {
		dir := t.TempDir()
		opt := testOptions(2)
		opt.Wavelengths = []float64{5000, 6000}
		ev := &fake{epochs: 2, waves: opt.Wavelengths}
		whole := filepath.Join(dir, "whole.csv")
		if _, err := Run(context.Background(), c.spec, Whole, ev, whole, opt); err != nil {
			t.Fatal(err)
		}
		parts := runShards(t, dir, c.spec, c.n, ev, opt)
		// Any order of the parts.
		for i, j := 0, len(parts)-1; i < j; i, j = i+1, j-1 {
			parts[i], parts[j] = parts[j], parts[i]
		}
		out := filepath.Join(dir, "merged.csv")
		info, err := Merge(out, parts...)
		if err != nil {
			t.Fatal(err)
		}
		if info.Rows != c.spec.Points() || info.Shard != Whole {
			t.Errorf("merge info %+v", info)
		}
		sameFile(t, out, whole)
		var sp []string
		for _, p := range parts {
			sp = append(sp, SpectraPath(p))
		}
		if _, err := Merge(filepath.Join(dir, "merged.spectra.csv"), sp...); err != nil {
			t.Fatal(err)
		}
		sameFile(t, filepath.Join(dir, "merged.spectra.csv"), SpectraPath(whole))
		st, err := os.Stat(out)
		if err != nil || st.Mode().Perm() != 0o644 {
			t.Errorf("merged file mode %v, %v", st.Mode(), err)
		}
	}
}

func sameFile(t *testing.T, a, b string) {
	t.Helper()
	x, err := os.ReadFile(a)
	if err != nil {
		t.Fatal(err)
	}
	y, err := os.ReadFile(b)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(x, y) {
		t.Fatalf("%s (%d bytes) and %s (%d bytes) differ", a, len(x), b, len(y))
	}
}

func TestMergeRefusals(t *testing.T) {
	dir := t.TempDir()
	s := mustSpec(t, exampleSpec)
	opt := testOptions(2)
	ev := &fake{epochs: 2}
	parts := runShards(t, dir, s, 4, ev, opt)
	other := t.TempDir()
	// Parts of another split, another grid, other inputs, other epochs.
	split3 := runShards(t, other, s, 3, ev, opt)
	s2 := mustSpec(t, strings.Replace(exampleSpec, `"steps": 5`, `"steps": 6`, 1))
	otherSpec := filepath.Join(other, "spec.csv")
	mustRun(t, s2, Shard{3, 4}, ev, otherSpec, opt)
	opt2 := testOptions(2)
	opt2.Inputs.Files[0].SHA256 = strings.Repeat("cd", 32)
	otherInputs := filepath.Join(other, "inputs.csv")
	mustRun(t, s, Shard{3, 4}, ev, otherInputs, opt2)
	otherEpochs := filepath.Join(other, "epochs.csv")
	mustRun(t, s, Shard{3, 4}, &fake{epochs: 3}, otherEpochs, testOptions(3))
	// An incomplete copy of part 3 and a damaged one.
	data, err := os.ReadFile(parts[3])
	if err != nil {
		t.Fatal(err)
	}
	cut := filepath.Join(other, "cut.csv")
	os.WriteFile(cut, data[:len(data)*2/3], 0o644)
	damaged := filepath.Join(other, "damaged.csv")
	os.WriteFile(damaged, bytes.Replace(data, []byte(",3500,"), []byte(",3501,"), 1), 0o644)
	resummed := filepath.Join(other, "resummed.csv")
	i := bytes.LastIndex(data, []byte("sha256 "))
	os.WriteFile(resummed, append(data[:i+7:i+7], []byte(strings.Repeat("0", 64)+"\n")...), 0o644)
	out := filepath.Join(dir, "merged.csv")

	cases := []struct {
		name  string
		parts []string
		want  string
		is    error
	}{
		{"missing", parts[:3], "1 of 4 shards missing: 3/4", ErrMerge},
		{"missing two", []string{parts[0], parts[2]}, "2 of 4 shards missing: 1/4, 3/4", ErrMerge},
		{"duplicate", []string{parts[0], parts[1], parts[2], parts[2], parts[3]}, "are both shard 2/4", ErrMerge},
		{"other split", append(parts[:2:2], split3[2]), "parts of different splits", ErrMerge},
		{"other spec", append(parts[:3:3], otherSpec), "different grids (another spec)", ErrMerge},
		{"other inputs", append(parts[:3:3], otherInputs), "different grids (other inputs)", ErrMerge},
		{"other epochs", append(parts[:3:3], otherEpochs), "different grids (other epochs)", ErrMerge},
		{"incomplete", append(parts[:3:3], cut), "a part is incomplete", ErrIncomplete},
		{"damaged", append(parts[:3:3], damaged), "damaged.csv:", ErrPart},
		{"bad checksum", append(parts[:3:3], resummed), "does not match the rows", ErrPart},
		{"absent", append(parts[:3:3], filepath.Join(dir, "nope.csv")), "nope.csv", os.ErrNotExist},
		{"none", nil, "no parts given", ErrMerge},
	}
	for _, c := range cases {
		_, err := Merge(out, c.parts...)
		if err == nil {
			t.Errorf("%s: merged", c.name)
			continue
		}
		if !strings.Contains(err.Error(), c.want) || !errors.Is(err, c.is) {
			t.Errorf("%s: %v; want %q wrapping %v", c.name, err, c.want, c.is)
		}
		if _, serr := os.Stat(out); serr == nil {
			t.Fatalf("%s: the output was written", c.name)
		}
	}
	if _, err := Merge(parts[0], parts...); err == nil || !strings.Contains(err.Error(), "is also a part") {
		t.Errorf("merge onto a part: %v", err)
	}
	if left, _ := filepath.Glob(filepath.Join(dir, ".*tmp*")); len(left) > 0 {
		t.Errorf("temporary files left: %v", left)
	}
}

func mustRun(t *testing.T, s *Spec, sh Shard, ev Evaluator, path string, opt Options) *Report {
	t.Helper()
	rep, err := Run(context.Background(), s, sh, ev, path, opt)
	if err != nil {
		t.Fatal(err)
	}
	return rep
}

// TestResume: a complete, matching part is skipped (no evaluation); a cut
// one, or one written for other inputs, is redone, with the reason said.
func TestResume(t *testing.T) {
	dir := t.TempDir()
	s := mustSpec(t, exampleSpec)
	opt := testOptions(1)
	opt.Wavelengths = []float64{5000}
	var notes []string
	opt.Note = func(m string) { notes = append(notes, m) }
	path := filepath.Join(dir, "p.csv")
	sh := Shard{1, 3}
	ev := &fake{epochs: 1, waves: opt.Wavelengths}
	if rep := mustRun(t, s, sh, ev, path, opt); rep.Skipped || rep.Redone != "" || ev.calls.Load() != 20 {
		t.Fatalf("first run: %+v, %d calls", rep, ev.calls.Load())
	}
	first, _ := os.ReadFile(path)

	ev.calls.Store(0)
	rep := mustRun(t, s, sh, ev, path, opt)
	if !rep.Skipped || ev.calls.Load() != 0 || rep.Points != 20 || rep.Failed != 1 {
		t.Errorf("second run: %+v, %d calls; want skipped, no calls", rep, ev.calls.Load())
	}
	if len(notes) != 1 || !strings.Contains(notes[0], "complete for shard 1/3, skipped") {
		t.Errorf("notes %q", notes)
	}

	for _, c := range []struct {
		name   string
		damage func()
		opt    Options
		want   string
	}{
		{"cut", func() { os.WriteFile(path, first[:len(first)/2], 0o644) }, opt, "p.csv is incomplete"},
		{"spectra cut", func() {
			b, _ := os.ReadFile(SpectraPath(path))
			os.WriteFile(SpectraPath(path), b[:len(b)-10], 0o644)
		}, opt, "p.spectra.csv is incomplete"},
		{"garbage", func() { os.WriteFile(path, []byte("x,y\n"), 0o644) }, opt, "p.csv is not a valid part"},
		{"spectra removed", func() { os.Remove(SpectraPath(path)) }, opt, "p.spectra.csv is missing"},
		{"other inputs", func() {}, func() Options { o := opt; o.Inputs.Program = "broadline other"; return o }(),
			"p.csv was written for other inputs; " + SpectraPath(path) + " was written for other inputs"},
	} {
		c.damage()
		ev.calls.Store(0)
		notes = nil
		rep := mustRun(t, s, sh, ev, path, c.opt)
		if rep.Skipped || ev.calls.Load() != 20 || !strings.Contains(rep.Redone, c.want) || len(notes) != 1 || !strings.Contains(notes[0], c.want) {
			t.Errorf("%s: %+v, %d calls, notes %q; want redone: %q", c.name, rep, ev.calls.Load(), notes, c.want)
		}
		if _, err := os.Stat(path); err != nil {
			t.Errorf("%s: %v", c.name, err)
		}
	}
	// Back to the original options: the file again equals the first one.
	mustRun(t, s, sh, ev, path, opt)
	if again, _ := os.ReadFile(path); !bytes.Equal(again, first) {
		t.Error("the redone part differs from the first")
	}
}

func TestRunCancel(t *testing.T) {
	dir := t.TempDir()
	s := mustSpec(t, exampleSpec)
	ctx, cancel := context.WithCancel(context.Background())
	ev := EvaluatorFunc(func(ctx context.Context, p Point) (Result, error) {
		if p.Index == 20 {
			cancel()
		}
		if err := ctx.Err(); err != nil {
			return Result{}, err
		}
		return Result{Epochs: []EpochFit{{1, 1}}}, nil
	})
	path := filepath.Join(dir, "p.csv")
	_, err := Run(ctx, s, Whole, ev, path, testOptions(1))
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("err %v, want context.Canceled", err)
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 0 {
		t.Errorf("files left after a stopped run: %v", entries)
	}
}

func TestOptionsChecked(t *testing.T) {
	s := mustSpec(t, exampleSpec)
	ev := &fake{epochs: 1}
	for _, c := range []struct {
		mod  func(*Options)
		want string
	}{
		{func(o *Options) { o.Epochs = nil }, "0 epoch labels"},
		{func(o *Options) { o.Epochs = []string{"a b"} }, `epoch label "a b"`},
		{func(o *Options) { o.Epochs = []string{"a", "a"} }, "given twice"},
		{func(o *Options) { o.Wavelengths = []float64{5000, 4000} }, "increasing"},
		{func(o *Options) { o.Inputs.Files[0].SHA256 = "ABC" }, "not 64 lower-case hex"},
		{func(o *Options) { o.Inputs.Files[0].Role = "Data Set" }, `input role "Data Set"`},
		{func(o *Options) { o.Inputs.Files[0].Name = "a\nb" }, "without control characters"},
	} {
		opt := testOptions(1)
		c.mod(&opt)
		_, err := Write(context.Background(), s, Whole, ev, &bytes.Buffer{}, &bytes.Buffer{}, opt)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("err %v, want %q", err, c.want)
		}
	}
	if _, err := Write(context.Background(), s, Shard{2, 2}, ev, &bytes.Buffer{}, nil, testOptions(1)); !errors.Is(err, ErrShard) {
		t.Errorf("shard 2/2: %v", err)
	}
}

func TestHashFile(t *testing.T) {
	p := filepath.Join(t.TempDir(), "abc.txt")
	os.WriteFile(p, []byte("abc"), 0o644)
	in, err := HashFile("dataset", p)
	if err != nil {
		t.Fatal(err)
	}
	// SHA-256("abc") from FIPS 180-2, appendix B.1.
	if in.SHA256 != "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad" || in.Name != p {
		t.Errorf("%+v", in)
	}
	if _, err := HashFile("dataset", p+".absent"); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("absent file: %v", err)
	}
}

// TestReadPartRefusals edits a valid part in the ways a damaged or
// hand-edited file could differ, and requires a clear refusal of each.
func TestReadPartRefusals(t *testing.T) {
	s := mustSpec(t, exampleSpec)
	good, _, _ := writeBytes(t, s, Shard{1, 2}, &fake{epochs: 1}, testOptions(1))
	if _, err := ReadPart(bytes.NewReader(good), "p.csv"); err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(string(good), "\n")
	hdr := 11 // header lines up to and including the header row
	join := func(ls []string) []byte { return []byte(strings.Join(ls, "")) }
	swap := append([]string{}, lines...)
	swap[hdr], swap[hdr+1] = swap[hdr+1], swap[hdr]
	drop := append(append([]string{}, lines[:hdr+2]...), lines[hdr+3:]...)
	dup := append(append([]string{}, lines[:hdr+2]...), lines[hdr+1:]...)
	cases := []struct {
		name string
		data []byte
		want string
		is   error
	}{
		{"empty", nil, "ends before its end line", ErrIncomplete},
		{"not a part", []byte("point,velocity\n"), "not a grid part", ErrPart},
		{"cut in the header", join(lines[:4]), "ends before its end line", ErrIncomplete},
		{"cut in a row", good[:len(good)-100], "ends before its end line", ErrIncomplete},
		{"no end line", join(lines[:len(lines)-2]), "ends before its end line", ErrIncomplete},
		{"swapped rows", join(swap), "p.csv:12: point 3 where point 1 is expected (a row missing or out of order)", ErrPart},
		{"dropped row", join(drop), "p.csv:14: point 7 where point 5 is expected", ErrPart},
		{"duplicated row", join(dup), "p.csv:14: point 3 again or out of order (want 5)", ErrPart},
		{"edited value", bytes.Replace(good, []byte("\n1,0.1,5000,"), []byte("\n1,0.1,5001,"), 1), "row not in the form", ErrPart},
		{"edited spec", bytes.Replace(good, []byte(`"steps":5`), []byte(`"steps":6`), 1), "is not the checksum of the spec line", ErrPart},
		{"edited shard", bytes.Replace(good, []byte("# shard: 1/2"), []byte("# shard: 0/2"), 1), "point 1 does not belong to shard 0/2", ErrPart},
		{"data after end", append(append([]byte{}, good...), "1,2\n"...), "data after the end line", ErrPart},
		{"long line", append(join(lines[:hdr]), bytes.Repeat([]byte("1"), MaxLineBytes+1)...), "longer than", ErrPart},
		{"bad kind", bytes.Replace(good, []byte("kind: chi2"), []byte("kind: other"), 1), `kind "other"`, ErrPart},
	}
	for _, c := range cases {
		_, err := ReadPart(bytes.NewReader(c.data), "p.csv")
		if err == nil || !strings.Contains(err.Error(), c.want) || !errors.Is(err, c.is) {
			t.Errorf("%s: %v; want %q wrapping %v", c.name, err, c.want, c.is)
		}
	}
}

// BenchmarkRun measures the grid machinery (enumeration, workers, ordered
// CSV writing with checksums) with the fake evaluator, in points/s.
func BenchmarkRun(b *testing.B) {
	s := mustSpec(b, `{"format":"broadline-grid/1","axes":[
		{"quantity":"velocity","from":0.1,"to":0.3,"steps":50},
		{"quantity":"temperature","from":3000,"to":6000,"steps":40},
		{"quantity":"fraction","element":"Nd","from":1e-5,"to":1e-2,"steps":10,"spacing":"log"}]}`)
	opt := testOptions(3)
	ev := &fake{epochs: 3}
	path := filepath.Join(b.TempDir(), "bench.csv")
	b.ResetTimer()
	for b.Loop() {
		os.Remove(path)
		if _, err := Run(context.Background(), s, Whole, ev, path, opt); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(s.Points())*float64(b.N)/b.Elapsed().Seconds(), "points/s")
}

// BenchmarkMerge measures Merge of four parts, in points/s.
func BenchmarkMerge(b *testing.B) {
	s := mustSpec(b, `{"format":"broadline-grid/1","axes":[
		{"quantity":"velocity","from":0.1,"to":0.3,"steps":50},
		{"quantity":"temperature","from":3000,"to":6000,"steps":40},
		{"quantity":"fraction","element":"Nd","from":1e-5,"to":1e-2,"steps":10,"spacing":"log"}]}`)
	opt := testOptions(3)
	ev := &fake{epochs: 3}
	dir := b.TempDir()
	var parts []string
	for i := range 4 {
		p := filepath.Join(dir, fmt.Sprintf("p%d.csv", i))
		if _, err := Run(context.Background(), s, Shard{i, 4}, ev, p, opt); err != nil {
			b.Fatal(err)
		}
		parts = append(parts, p)
	}
	b.ResetTimer()
	for b.Loop() {
		if _, err := Merge(filepath.Join(dir, "m.csv"), parts...); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(s.Points())*float64(b.N)/b.Elapsed().Seconds(), "points/s")
}
