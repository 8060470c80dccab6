package audit

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"errors"
	"fmt"
	"io"
	"os"
	"runtime"
	"sync"

	"github.com/viewspec/viewspec/internal/jsonl"
	"github.com/viewspec/viewspec/spec"
	"github.com/viewspec/viewspec/wire"
)

// MaxRecordBytes is the longest drive-log line the audit reads; a longer
// one is a bad record.
const MaxRecordBytes = 64 << 20

// BadRecord is a drive-log line the audit could not use: where it is and
// why, naming the field.
type BadRecord struct {
	File      string `json:"file"`
	Line      int    `json:"line"`
	RequestID string `json:"request_id,omitempty"`
	Field     string `json:"field,omitempty"`
	Reason    string `json:"reason"`
}

func (b *BadRecord) Error() string {
	s := fmt.Sprintf("%s:%d: ", b.File, b.Line)
	if b.RequestID != "" {
		s += "request " + b.RequestID + ": "
	}
	return s + b.Reason
}

// Options steer Run.
type Options struct {
	Sets    RuleSets // rules_ref → rule set
	By      []string // tags to group by
	Workers int      // records audited at once; 0: one per core
	// OnResult, when set, gets every audited record in input order (files
	// in the order given, lines in file order), from one goroutine.
	OnResult func(*Result) error
	// OnBad, when set, gets every bad record in input order.
	OnBad func(*BadRecord)
	// OnBytes, when set, gets the compressed bytes read so far of the
	// current file, for a progress bar.
	OnBytes func(file string, n int64)
}

// batchPerWorker is how many records each worker holds at once: memory is
// bounded by Workers × batchPerWorker records whatever the logs' size.
const batchPerWorker = 16

// Run audits the drive logs files (JSON Lines, plain or gzip) and returns
// the totals. A bad record is reported (OnBad), counted and skipped; only a
// file that cannot be opened, or an OnResult error, stops the run. The
// totals and the order of the callbacks do not depend on Workers.
func Run(files []string, opt Options) (*Totals, error) {
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	tot := NewTotals(opt.By)
	type item struct {
		file   string
		line   int
		data   []byte
		res    *Result
		bad    *BadRecord
		broken bool // a read error, not a record
	}
	batch := make([]item, 0, workers*batchPerWorker)
	flush := func() error {
		var wg sync.WaitGroup
		for w := range workers {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for i := w; i < len(batch); i += workers {
					it := &batch[i]
					if it.bad == nil {
						it.res, it.bad = auditLine(it.file, it.line, it.data, opt.Sets)
					}
				}
			}()
		}
		wg.Wait()
		for i := range batch {
			it := &batch[i]
			if it.bad != nil {
				tot.BadRecords++
				if opt.OnBad != nil {
					opt.OnBad(it.bad)
				}
				continue
			}
			tot.Add(it.res)
			if opt.OnResult != nil {
				if err := opt.OnResult(it.res); err != nil {
					return err
				}
			}
		}
		batch = batch[:0]
		return nil
	}
	for _, name := range files {
		f, err := os.Open(name)
		if err != nil {
			return nil, err
		}
		last := 0
		err = eachRecord(f, name, opt.OnBytes, func(line int, data []byte, tooLong bool) error {
			last = line
			it := item{file: name, line: line, data: append([]byte(nil), data...)}
			if tooLong {
				it.bad = &BadRecord{File: name, Line: line, Reason: fmt.Sprintf("line longer than %d bytes", MaxRecordBytes)}
			}
			batch = append(batch, it)
			if len(batch) == cap(batch) {
				return flush()
			}
			return nil
		})
		f.Close()
		if err != nil {
			var stop stopError
			if errors.As(err, &stop) {
				return nil, stop.err
			}
			// A read error (a truncated gzip, an I/O fault): the records
			// before it count; the break is a bad record of its own.
			batch = append(batch, item{file: name, line: last + 1,
				bad: &BadRecord{File: name, Line: last + 1, Reason: "the file breaks off here: " + err.Error()}})
		}
		if err := flush(); err != nil {
			return nil, err
		}
	}
	return tot, nil
}

// stopError carries an error of the caller's callback out of the reader,
// apart from read errors.
type stopError struct{ err error }

func (s stopError) Error() string { return s.err.Error() }

// eachRecord reads the lines of one log, gunzipping it when it starts with
// gzip's magic bytes.
func eachRecord(f *os.File, name string, onBytes func(string, int64), fn func(int, []byte, bool) error) error {
	var r io.Reader = f
	if onBytes != nil {
		r = &countingReader{r: f, fn: func(n int64) { onBytes(name, n) }}
	}
	br := bufio.NewReaderSize(r, 64<<10)
	if magic, _ := br.Peek(2); bytes.Equal(magic, []byte{0x1f, 0x8b}) {
		zr, err := gzip.NewReader(br)
		if err != nil {
			return err
		}
		defer zr.Close()
		r = zr
	} else {
		r = br
	}
	return jsonl.EachLine(r, MaxRecordBytes, func(line int, data []byte, tooLong bool) error {
		if err := fn(line, data, tooLong); err != nil {
			return stopError{err}
		}
		return nil
	})
}

type countingReader struct {
	r  io.Reader
	n  int64
	fn func(int64)
}

func (c *countingReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n += int64(n)
	c.fn(c.n)
	return n, err
}

// auditLine decodes and audits one line; a record that panics the audit is
// a bad record naming the panic, never a crash.
func auditLine(file string, line int, data []byte, sets RuleSets) (res *Result, bad *BadRecord) {
	id := requestID(data)
	defer func() {
		if p := recover(); p != nil {
			res, bad = nil, &BadRecord{File: file, Line: line, RequestID: id, Reason: fmt.Sprintf("the audit failed on this record: %v", p)}
		}
	}()
	rec, err := DecodeRecord(data, sets)
	if err == nil {
		res, err = Audit(rec)
	}
	if err != nil {
		b := &BadRecord{File: file, Line: line, RequestID: id}
		var fe *spec.FieldError
		if errors.As(err, &fe) {
			b.Field, b.Reason = fe.Field, fe.Error()
		} else {
			_, b.Reason = wire.DecodeError(err)
		}
		return nil, b
	}
	return res, nil
}

// requestID returns the line's request_id when it has a readable one.
func requestID(data []byte) string {
	var r struct {
		ID string `json:"request_id"`
	}
	if wire.Unmarshal(data, &r) != nil {
		return ""
	}
	return r.ID
}
