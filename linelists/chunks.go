package linelists

import (
	"bytes"
	"compress/gzip"
	"errors"
	"fmt"
	"io"
	"sync"
	"sync/atomic"

	"broadline/physics"
)

// chunkSize is the size of the blocks of rows parsed at a time.
const chunkSize = 1 << 20

// rowParser turns data rows into lines. Each goroutine has its own copy
// (the species cache and field buffer are not shared).
type rowParser struct {
	cm     colMap
	fixed  Species
	medium physics.Medium
	comma  bool
	filter *Filter
	want   map[Species]bool
	sc     speciesCache
	fields [][]byte
	name   string
}

func (rp *rowParser) clone() *rowParser {
	return &rowParser{cm: rp.cm, fixed: rp.fixed, medium: rp.medium, comma: rp.comma, filter: rp.filter, want: rp.want, name: rp.name}
}

// chunkResult is what parsing one block of rows gives.
type chunkResult struct {
	lines   []Line
	rows    int
	skipped Skipped
	err     error // the first error in the block, a *ParseError
}

// parseLine parses one trimmed, non-empty line (a comment is skipped).
func (rp *rowParser) parseLine(line []byte, lineNo int, res *chunkResult) {
	perr := func(col int, err error) {
		res.err = &ParseError{File: rp.name, Line: lineNo, Column: col, Err: err}
	}
	if line[0] == '#' {
		return
	}
	var err error
	rp.fields, err = splitFields(rp.fields[:0], line, rp.comma)
	if err != nil {
		perr(0, err)
		return
	}
	cm := &rp.cm
	if cm.nfields > 0 && len(rp.fields) != cm.nfields {
		perr(0, fmt.Errorf("%w: %d fields, the header names %d", ErrFieldCount, len(rp.fields), cm.nfields))
		return
	}
	if len(rp.fields) <= cm.maxCol {
		perr(0, fmt.Errorf("%w: %d fields, the column mapping needs at least %d", ErrFieldCount, len(rp.fields), cm.maxCol+1))
		return
	}
	res.rows++
	l, col, err := parseRow(rp.fields, cm, rp.fixed, &rp.sc)
	if err != nil {
		perr(col+1, err)
		return
	}
	if rp.medium == physics.Air {
		l.Wavelength = physics.AirToVacuum(l.Wavelength)
	}
	if f := rp.filter; f.active() {
		switch {
		case f.MinWavelength > 0 && l.Wavelength < f.MinWavelength, f.MaxWavelength > 0 && l.Wavelength > f.MaxWavelength:
			res.skipped.Wavelength++
			return
		case rp.want != nil && !rp.want[l.Species]:
			res.skipped.Species++
			return
		case f.HasMinLogGF && l.LogGF < f.MinLogGF:
			res.skipped.Strength++
			return
		}
	}
	res.lines = append(res.lines, l)
}

// parseChunk parses a block of whole lines whose first line is number
// first.
func (rp *rowParser) parseChunk(data []byte, first int, res *chunkResult) {
	if res.lines == nil {
		res.lines = make([]Line, 0, len(data)/32+16) // rows are rarely shorter
	}
	lineNo := first - 1
	for len(data) > 0 {
		var line []byte
		if i := bytes.IndexByte(data, '\n'); i >= 0 {
			line, data = data[:i], data[i+1:]
		} else {
			line, data = data, nil
		}
		lineNo++
		if len(line) > maxLineLength {
			res.err = &ParseError{File: rp.name, Line: lineNo, Err: fmt.Errorf("%w: longer than %d bytes", ErrTooLong, maxLineLength)}
			return
		}
		line = bytes.TrimSpace(line)
		if len(line) == 0 {
			continue
		}
		rp.parseLine(line, lineNo, res)
		if res.err != nil {
			return
		}
	}
}

func (b *Builder) addChunk(res *chunkResult, fr *FileReport) {
	for i := range res.lines {
		b.Add(res.lines[i])
	}
	fr.Rows += res.rows
	fr.Added += len(res.lines)
	fr.Skipped.add(res.skipped)
}

// chunkJob is one block in flight; done is closed when res is ready.
type chunkJob struct {
	data  []byte
	first int
	res   chunkResult
	done  chan struct{}
}

// readRows parses the rest of r (after line lastLine) in blocks, with
// workers goroutines when workers > 1, and adds the lines to b in file
// order. The first error in file order is returned.
func (b *Builder) readRows(r io.Reader, lastLine int, rp *rowParser, name string, workers int, fr *FileReport) error {
	rp.name = name
	next := chunker(r, lastLine+1, name)
	if workers <= 1 {
		p := rp.clone()
		var lines []Line // reused from chunk to chunk
		for {
			job, ok := next()
			if !ok {
				return nil
			}
			if job.res.err == nil {
				job.res.lines = lines[:0]
				p.parseChunk(job.data, job.first, &job.res)
			}
			if job.res.err != nil {
				return job.res.err
			}
			b.addChunk(&job.res, fr)
			lines = job.res.lines
		}
	}
	var pool sync.Pool // []Line buffers returned after use
	order := make(chan *chunkJob, 2*workers)
	jobs := make(chan *chunkJob, workers)
	var stop atomic.Bool
	go func() {
		defer close(order)
		defer close(jobs)
		for !stop.Load() {
			job, ok := next()
			if !ok {
				return
			}
			order <- job
			if job.res.err != nil {
				close(job.done)
				return
			}
			jobs <- job
		}
	}()
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			p := rp.clone()
			for job := range jobs {
				if buf, ok := pool.Get().(*[]Line); ok {
					job.res.lines = (*buf)[:0]
				}
				p.parseChunk(job.data, job.first, &job.res)
				close(job.done)
			}
		}()
	}
	var firstErr error
	for job := range order {
		<-job.done
		if firstErr != nil {
			continue // draining after an error
		}
		if job.res.err != nil {
			firstErr = job.res.err
			stop.Store(true)
			continue
		}
		b.addChunk(&job.res, fr)
		buf := job.res.lines
		pool.Put(&buf)
		job.res.lines = nil
	}
	wg.Wait()
	return firstErr
}

// chunker returns a function that reads r in blocks of whole lines. A
// read error comes back as a job with res.err set.
func chunker(r io.Reader, firstLine int, name string) func() (*chunkJob, bool) {
	var carry []byte
	line := firstLine
	eof := false
	return func() (*chunkJob, bool) {
		if eof {
			return nil, false
		}
		buf := make([]byte, len(carry), len(carry)+chunkSize)
		copy(buf, carry)
		var err error
		for len(buf) < cap(buf) && err == nil {
			var n int
			n, err = r.Read(buf[len(buf):cap(buf)])
			buf = buf[:len(buf)+n]
		}
		job := &chunkJob{first: line, done: make(chan struct{})}
		switch {
		case err == io.EOF:
			eof = true
			carry = nil
			job.data = buf
		case err != nil:
			eof = true
			cause := fmt.Errorf("reading: %w", err)
			if errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, gzip.ErrChecksum) || errors.Is(err, gzip.ErrHeader) {
				cause = fmt.Errorf("%w: compressed data: %v", ErrSyntax, err)
			}
			job.res.err = &ParseError{File: name, Line: line + bytes.Count(buf, []byte{'\n'}), Err: cause}
			return job, true
		default:
			i := bytes.LastIndexByte(buf, '\n')
			if i < 0 {
				eof = true
				job.res.err = &ParseError{File: name, Line: line, Err: fmt.Errorf("%w: longer than %d bytes", ErrTooLong, maxLineLength)}
				return job, true
			}
			carry = append(carry[:0], buf[i+1:]...)
			job.data = buf[:i+1]
		}
		line += bytes.Count(job.data, []byte{'\n'})
		if len(job.data) == 0 && eof {
			return nil, false
		}
		return job, true
	}
}
