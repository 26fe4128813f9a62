package chain

import (
	"bytes"
	"errors"
	"io"
	"runtime"
	"sync"
)

// Parallel parsing of the lines of a from,to,probability list. The input
// after the header is cut into chunks of whole lines; workers split the
// lines of a chunk, check the field count and the labels, and parse the
// probabilities (the costly part: splitting and strconv.ParseFloat), and
// the chunks are then numbered in input order by one goroutine, so the
// states are numbered in order of first appearance and the result, and
// the first error reported, are those of a sequential read.

const listChunkBytes = 1 << 20

// listChunk is one parsed chunk: transition t has labels
// lab[off[2t]:off[2t+1]] and lab[off[2t+1]:off[2t+2]], probability p[t],
// line line[t]. err, if set, is the first error of the chunk, on a line
// after the transitions returned.
type listChunk struct {
	lab  []byte
	off  []int32
	p    []float64
	line []int32
	err  error
}

// parseListLines reads the rest of lr's input and calls each for the
// chunks in input order; it stops at the first error (of a chunk, of
// reading, or returned by each).
func parseListLines(lr *lineReader, each func(c *listChunk) error) error {
	workers := max(1, runtime.GOMAXPROCS(0))
	type job struct {
		buf   []byte
		line0 int
		out   chan *listChunk
	}
	jobs := make(chan job, workers)
	order := make(chan chan *listChunk, 2*workers)
	done := make(chan struct{})
	var readErr error
	go func() { // producer
		defer close(order)
		defer close(jobs)
		line := lr.line
		var carry []byte
		for {
			buf := make([]byte, len(carry), max(listChunkBytes, 2*len(carry)))
			copy(buf, carry)
			n, err := io.ReadFull(lr.br, buf[len(buf):cap(buf)])
			buf = buf[:len(buf)+n]
			last := err != nil
			if err != nil && !errors.Is(err, io.EOF) && !errors.Is(err, io.ErrUnexpectedEOF) {
				readErr = &ReadError{File: lr.file, Line: line + 1 + bytes.Count(buf, []byte("\n")), Err: err}
				return
			}
			cut := len(buf)
			if !last {
				cut = bytes.LastIndexByte(buf, '\n') + 1
				if cut == 0 { // no line end yet: a long line
					if len(buf) > MaxLineBytes {
						readErr = lr.errf(line+1, 0, "line longer than %d bytes", MaxLineBytes)
						return
					}
					carry = buf
					continue
				}
			}
			carry = append([]byte(nil), buf[cut:]...)
			out := make(chan *listChunk, 1)
			select {
			case order <- out:
			case <-done:
				return
			}
			select {
			case jobs <- job{buf[:cut], line, out}:
			case <-done:
				return
			}
			line += bytes.Count(buf[:cut], []byte("\n"))
			if last {
				return
			}
		}
	}()
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			w := &lineReader{file: lr.file}
			for j := range jobs {
				j.out <- parseListChunk(w, j.buf, j.line0)
			}
		}()
	}
	var err error
	for out := range order {
		c := <-out
		if err = each(c); err == nil {
			err = c.err
		}
		if err != nil {
			break
		}
	}
	close(done) // the producer stops; the workers end when it closes jobs
	wg.Wait()
	if err == nil {
		err = readErr
	}
	return err
}

// parseListChunk parses the lines of buf, the first of which is line
// line0+1 of the input.
func parseListChunk(w *lineReader, buf []byte, line0 int) *listChunk {
	c := &listChunk{off: []int32{0}}
	w.line = line0
	for len(buf) > 0 {
		var b []byte
		if k := bytes.IndexByte(buf, '\n'); k >= 0 {
			b, buf = buf[:k], buf[k+1:]
		} else {
			b, buf = buf, nil
		}
		w.line++
		b = bytes.TrimSuffix(b, []byte("\r"))
		if len(b) > MaxLineBytes {
			c.err = w.errf(w.line, 0, "line longer than %d bytes", MaxLineBytes)
			return c
		}
		if len(bytes.TrimSpace(b)) == 0 {
			continue
		}
		if err := w.split(b); err != nil {
			c.err = err
			return c
		}
		f := w.fields
		if len(f) != 3 {
			c.err = w.errf(w.line, 0, "%d fields %q: want 3 (from,to,probability)", len(f), joinFields(f))
			return c
		}
		for k := 0; k < 2; k++ {
			if len(f[k]) == 0 {
				c.err = w.errf(w.line, k+1, "empty state label")
				return c
			}
		}
		p, err := w.parseProb(f[2], 3)
		if err != nil {
			c.err = err
			return c
		}
		c.lab = append(c.lab, f[0]...)
		c.off = append(c.off, int32(len(c.lab)))
		c.lab = append(c.lab, f[1]...)
		c.off = append(c.off, int32(len(c.lab)))
		c.p = append(c.p, p)
		c.line = append(c.line, int32(w.line))
	}
	return c
}
