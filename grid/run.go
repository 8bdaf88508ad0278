package grid

import (
	"bufio"
	"bytes"
	"context"
	"crypto/sha256"
	"errors"
	"fmt"
	"hash"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"sync"
)

// Result is what an evaluator gives for one point.
type Result struct {
	// Epochs holds the fit to each epoch, in the order of Options.Epochs.
	Epochs []EpochFit
	// Spectra, when Options.Wavelengths is set, holds the model flux of each
	// epoch (in the order of Options.Epochs) at those wavelengths.
	Spectra [][]float64
}

// Evaluator computes the model at a grid point. Evaluate is called from
// several goroutines at once. An error is recorded in the point's row and
// the run goes on; an error while ctx is done stops the run.
type Evaluator interface {
	Evaluate(ctx context.Context, p Point) (Result, error)
}

// EvaluatorFunc adapts a function to the Evaluator interface.
type EvaluatorFunc func(ctx context.Context, p Point) (Result, error)

// Evaluate calls f.
func (f EvaluatorFunc) Evaluate(ctx context.Context, p Point) (Result, error) { return f(ctx, p) }

// Options are the settings of a run besides the spec and the shard.
type Options struct {
	// Inputs are recorded in the part files; Merge refuses parts whose
	// inputs differ.
	Inputs Inputs
	// Epochs labels the evaluator's per-epoch results (1–MaxEpochs labels
	// of letters, digits, '.', '_', '-'); they name the columns chi2n_LABEL
	// and n_LABEL.
	Epochs []string
	// Wavelengths, when not nil, asks for model spectra at these vacuum
	// wavelengths in Å (increasing), written to a second part file.
	Wavelengths []float64
	// Workers is the number of points evaluated at once; ≤ 0 means
	// runtime.GOMAXPROCS(0).
	Workers int
	// Progress, when not nil, is called after each point is written, with
	// the number of the shard's points done and their total.
	Progress func(done, total int)
	// Note, when not nil, receives messages about resumed work (a part
	// skipped, or redone and why).
	Note func(msg string)
}

// Report says what a run did.
type Report struct {
	Shard   Shard
	Points  int  // points of the shard
	Failed  int  // points whose evaluation failed (recorded in the error column)
	Skipped bool // the part files were already complete and matching: nothing was computed
	// Redone, when not empty, says why existing part files were computed again.
	Redone string
}

// SpectraPath is the path of the spectra part that goes with the χ² part at
// path: path without its ".csv" suffix, and ".spectra.csv".
func SpectraPath(path string) string {
	return strings.TrimSuffix(path, ".csv") + ".spectra.csv"
}

func (o *Options) headers(spec *Spec, shard Shard) (chi, spc *header, err error) {
	if spec == nil || spec.canon == nil {
		return nil, nil, fmt.Errorf("grid: a spec from DecodeSpec or NewSpec is needed: %w", ErrInputs)
	}
	if err := shard.Valid(); err != nil {
		return nil, nil, err
	}
	if err := o.Inputs.valid(); err != nil {
		return nil, nil, err
	}
	if err := checkEpochs(o.Epochs); err != nil {
		return nil, nil, err
	}
	chi = &header{kind: KindChi2, program: o.Inputs.Program, spec: spec, inputs: o.Inputs.Files, epochs: o.Epochs, shard: shard}
	if o.Wavelengths != nil {
		if err := checkWavelengths(o.Wavelengths); err != nil {
			return nil, nil, err
		}
		h := *chi
		h.kind, h.wavelengths = KindSpectra, o.Wavelengths
		spc = &h
	}
	return chi, spc, nil
}

// Write evaluates the points of one shard and writes its χ² part to chi2
// and, when opt.Wavelengths is set, its spectra part to spectra (not nil
// then). Points are evaluated by opt.Workers goroutines and written in
// point order, so the bytes written do not depend on the number of workers.
// It stops when ctx is done, returning an error wrapping ctx.Err().
func Write(ctx context.Context, spec *Spec, shard Shard, eval Evaluator, chi2, spectra io.Writer, opt Options) (*Report, error) {
	hc, hs, err := opt.headers(spec, shard)
	if err != nil {
		return nil, err
	}
	if hs != nil && spectra == nil {
		return nil, fmt.Errorf("grid: wavelengths given but no writer for the spectra: %w", ErrInputs)
	}
	rep := &Report{Shard: shard, Points: shard.Size(spec.points)}
	cw := newSumWriter(chi2)
	cw.Write(hc.bytes())
	var sw *sumWriter
	if hs != nil {
		sw = newSumWriter(spectra)
		sw.Write(hs.bytes())
	}
	ne, nw := len(opt.Epochs), len(opt.Wavelengths)
	var buf []byte
	emit := func(p Point, res Result, evalErr error) {
		msg := ""
		if evalErr != nil {
			msg = cleanMessage(evalErr.Error())
		} else if m := checkResult(res, ne, nw, hs != nil); m != "" {
			msg = m
		}
		if msg != "" {
			rep.Failed++
			buf = appendChi2Row(buf[:0], spec, p, nil, ne, msg)
		} else {
			buf = appendChi2Row(buf[:0], spec, p, res.Epochs, ne, "")
		}
		cw.Write(buf)
		if sw != nil {
			for e, label := range opt.Epochs {
				var flux []float64
				if msg == "" {
					flux = res.Spectra[e]
				}
				buf = appendSpectrumRow(buf[:0], p.Index, label, flux, nw)
				sw.Write(buf)
			}
		}
	}
	if err := evaluate(ctx, spec, shard, eval, opt, emit); err != nil {
		return nil, err
	}
	cw.end(rep.Points)
	if sw != nil {
		sw.end(rep.Points * ne)
		if sw.err != nil {
			return nil, fmt.Errorf("grid: writing spectra: %w", sw.err)
		}
	}
	if cw.err != nil {
		return nil, fmt.Errorf("grid: writing χ² part: %w", cw.err)
	}
	return rep, nil
}

// checkResult says what is wrong with an evaluator's result, or "".
func checkResult(res Result, ne, nw int, spectra bool) string {
	if len(res.Epochs) != ne {
		return fmt.Sprintf("evaluator returned %d epoch fits, want %d", len(res.Epochs), ne)
	}
	for i, f := range res.Epochs {
		if f.N < 0 {
			return fmt.Sprintf("evaluator returned N = %d for epoch %d", f.N, i+1)
		}
	}
	if !spectra {
		return ""
	}
	if len(res.Spectra) != ne {
		return fmt.Sprintf("evaluator returned %d spectra, want %d", len(res.Spectra), ne)
	}
	for i, s := range res.Spectra {
		if len(s) != nw {
			return fmt.Sprintf("evaluator returned a spectrum of %d samples for epoch %d, want %d", len(s), i+1, nw)
		}
	}
	return ""
}

// evaluate runs eval over the shard's points with opt.Workers goroutines
// and calls emit for each point in point order, from one goroutine.
func evaluate(ctx context.Context, spec *Spec, shard Shard, eval Evaluator, opt Options, emit func(Point, Result, error)) error {
	total := shard.Size(spec.points)
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = max(1, min(workers, total))
	type outcome struct {
		j   int
		p   Point
		res Result
		err error
	}
	// At most window points are evaluated or waiting to be written.
	window := 4 * workers
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	jobs := make(chan int)
	results := make(chan outcome, window)
	tokens := make(chan struct{}, window)
	var wg sync.WaitGroup
	go func() {
		defer close(jobs)
		for j := range total {
			select {
			case tokens <- struct{}{}:
			case <-ctx.Done():
				return
			}
			select {
			case jobs <- j:
			case <-ctx.Done():
				return
			}
		}
	}()
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range jobs {
				p := spec.Point(shard.Index + j*shard.Count)
				res, err := eval.Evaluate(ctx, p)
				select {
				case results <- outcome{j, p, res, err}:
				case <-ctx.Done():
					return
				}
			}
		}()
	}
	go func() { wg.Wait(); close(results) }()

	pending := make(map[int]outcome, window)
	next := 0
	for o := range results {
		pending[o.j] = o
		for {
			o, ok := pending[next]
			if !ok {
				break
			}
			delete(pending, next)
			if o.err != nil {
				if err := ctx.Err(); err != nil {
					return fmt.Errorf("grid: point %d: %w", o.p.Index, err)
				}
			}
			emit(o.p, o.res, o.err)
			next++
			<-tokens
			if opt.Progress != nil {
				opt.Progress(next, total)
			}
		}
	}
	if next < total {
		if err := ctx.Err(); err != nil {
			return fmt.Errorf("grid: shard %s stopped after %d of %d points: %w", shard, next, total, err)
		}
		return fmt.Errorf("grid: shard %s: only %d of %d points evaluated", shard, next, total)
	}
	return nil
}

// sumWriter writes through a buffer and keeps the SHA-256 of what it wrote.
type sumWriter struct {
	w    *bufio.Writer
	sum  hash.Hash
	rows int
	err  error
}

func newSumWriter(w io.Writer) *sumWriter {
	return &sumWriter{w: bufio.NewWriterSize(w, 256<<10), sum: sha256.New()}
}

func (s *sumWriter) Write(b []byte) {
	if s.err != nil {
		return
	}
	s.sum.Write(b)
	_, s.err = s.w.Write(b)
}

// end writes the end line and flushes.
func (s *sumWriter) end(rows int) {
	if s.err != nil {
		return
	}
	if _, s.err = s.w.WriteString(endLine(rows, s.sum.Sum(nil))); s.err != nil {
		return
	}
	s.err = s.w.Flush()
}

// Run evaluates one shard into the part file at path (and, when
// opt.Wavelengths is set, the spectra part at SpectraPath(path)), each
// written to a temporary file in the same directory and renamed into
// place (mode 0644), so a part file is either absent or whole. When the
// part files already exist, are complete and were written for the same
// spec, inputs, epochs, wavelengths and shard, nothing is computed
// (Report.Skipped); when they exist but are incomplete or were written for
// something else, they are computed again and Report.Redone says why (also
// passed to opt.Note).
func Run(ctx context.Context, spec *Spec, shard Shard, eval Evaluator, path string, opt Options) (*Report, error) {
	hc, hs, err := opt.headers(spec, shard)
	if err != nil {
		return nil, err
	}
	note := func(msg string) {
		if opt.Note != nil {
			opt.Note(msg)
		}
	}
	paths := []string{path}
	heads := []*header{hc}
	if hs != nil {
		paths = append(paths, SpectraPath(path))
		heads = append(heads, hs)
	}
	var reasons, absent []string
	complete := 0
	var info *PartInfo
	for i, p := range paths {
		inf, why := existing(p, heads[i])
		switch {
		case why == "":
			complete++
			if i == 0 {
				info = inf
			}
		case why == "absent":
			absent = append(absent, p)
		default:
			reasons = append(reasons, why)
		}
	}
	if complete > 0 {
		for _, p := range absent {
			reasons = append(reasons, p+" is missing")
		}
	}
	if complete == len(paths) {
		note(fmt.Sprintf("%s: complete for shard %s, skipped", path, shard))
		return &Report{Shard: shard, Points: info.Rows, Failed: info.Failed, Skipped: true}, nil
	}
	redone := strings.Join(reasons, "; ")
	if redone != "" {
		note(redone + ": computing the shard again")
	}

	tmps := make([]*os.File, len(paths))
	defer func() {
		for _, f := range tmps {
			if f != nil {
				f.Close()
				os.Remove(f.Name())
			}
		}
	}()
	for i, p := range paths {
		f, err := os.CreateTemp(filepath.Dir(p), "."+filepath.Base(p)+".tmp*")
		if err != nil {
			return nil, fmt.Errorf("grid: %w", err)
		}
		tmps[i] = f
	}
	var spw io.Writer
	if len(tmps) > 1 {
		spw = tmps[1]
	}
	rep, err := Write(ctx, spec, shard, eval, tmps[0], spw, opt)
	if err != nil {
		return nil, err
	}
	rep.Redone = redone
	// Spectra first, so a complete χ² part never stands beside a missing spectra part of this run.
	for i := len(tmps) - 1; i >= 0; i-- {
		f := tmps[i]
		if err := f.Chmod(0o644); err != nil {
			return nil, fmt.Errorf("grid: %w", err)
		}
		if err := f.Sync(); err != nil {
			return nil, fmt.Errorf("grid: %w", err)
		}
		if err := f.Close(); err != nil {
			return nil, fmt.Errorf("grid: %w", err)
		}
		if err := os.Rename(f.Name(), paths[i]); err != nil {
			return nil, fmt.Errorf("grid: %w", err)
		}
		tmps[i] = nil
	}
	return rep, nil
}

// existing checks the part file at path against the header a run would
// write: "" when it is complete and matching, "absent" when there is none,
// otherwise why it must be redone.
func existing(path string, want *header) (*PartInfo, string) {
	f, err := os.Open(path)
	if errors.Is(err, os.ErrNotExist) {
		return nil, "absent"
	}
	if err != nil {
		return nil, fmt.Sprintf("%s cannot be read (%v)", path, err)
	}
	defer f.Close()
	info, err := ReadPart(f, path)
	switch {
	case errors.Is(err, ErrIncomplete):
		return nil, fmt.Sprintf("%s is incomplete", path)
	case err != nil:
		return nil, fmt.Sprintf("%s is not a valid part (%v)", path, err)
	}
	if _, err := f.Seek(0, io.SeekStart); err != nil {
		return nil, fmt.Sprintf("%s cannot be read (%v)", path, err)
	}
	wb := want.bytes()
	got := make([]byte, len(wb))
	if _, err := io.ReadFull(f, got); err != nil || !bytes.Equal(got, wb) {
		return nil, fmt.Sprintf("%s was written for %s", path, differs(info, want))
	}
	return info, ""
}

// differs names what differs between a part and the header wanted.
func differs(info *PartInfo, want *header) string {
	switch {
	case info.Kind != want.kind:
		return "another kind of part"
	case info.SpecSHA != want.spec.SHA256():
		return "another spec"
	case info.Shard != want.shard:
		return "shard " + info.Shard.String()
	case !slices.Equal(info.Inputs, want.inputs) || info.Program != want.program:
		return "other inputs"
	case !slices.Equal(info.Epochs, want.epochs):
		return "other epochs"
	}
	return "other wavelengths"
}
