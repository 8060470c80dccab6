package check

import (
	"cmp"
	"encoding/json"
	"errors"
	"fmt"
	"hash/maphash"
	"io"
	"slices"

	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/internal/ordered"
	"github.com/viewspec/viewspec/spec"
)

// streamBatch is how many lines a reader parses, or cases a worker
// compares or validates, at a time.
const streamBatch = 256

// CheckStreams reads a corpus and an implementation's answers side by
// side in one pass, matches them by id, and checks each pair as soon as
// both are read, comparing on every core and recording in the order the
// pairs were matched (the report does not depend on the number of cores).
// Memory stays constant whatever the corpus's size when the answers come
// in the corpus's order, as `eval` writes them, apart from the set of ids
// (a repeated id is found); answers out of order wait in memory for their
// case. An unusable corpus line ends the check with a *corpus.ReadError;
// an unusable answer line is stray and reading goes on. Cases left without
// an answer are missing, and answers left without a case stray, once both
// streams end.
func CheckStreams(corpusName string, cases io.Reader, answersName string, answers io.Reader, ck *Checker) error {
	quit := make(chan struct{})
	defer close(quit)
	// Short queues: the readers stay a few batches ahead, no more.
	caseCh := make(chan []caseItem, 2)
	ansCh := make(chan []answerItem, 2)
	go readCases(corpusName, cases, caseCh, quit)
	go readAnswers(answersName, answers, ansCh, quit)

	m := matcher{
		ck: ck, corpusName: corpusName, seen: map[idKey]caseState{},
		pendingCases: map[string]pendingCase{}, pendingAnswers: map[string]corpus.Answer{},
	}
	err := ordered.Map(streamBatch, func(emit func(casePair) bool) error {
		m.emit = emit
		return m.run(caseCh, ansCh)
	}, func(p casePair) CaseResult {
		return compareCase(&p.c, p.got, &ck.p)
	}, func(p casePair, res CaseResult) error {
		ck.add(&p.c, res)
		return nil
	})
	if err != nil {
		return err
	}
	m.finish()
	return nil
}

// casePair is a case and the answer matched to it.
type casePair struct {
	c   corpus.Case
	got json.RawMessage
}

// caseItem is one corpus line read: a case, or the error that ends the
// corpus.
type caseItem struct {
	c    corpus.Case
	line int
	err  error
}

// answerItem is one answer line read: an answer, or why it is unusable.
type answerItem struct {
	a   corpus.Answer
	bad string
}

// readCases parses the corpus's lines into batches on out, ending with an
// error item if a line is unusable or the file cannot be read on; it gives
// up when quit closes.
func readCases(name string, r io.Reader, out chan<- []caseItem, quit <-chan struct{}) {
	readBatches(r, out, quit, func(line int, b []byte, tooLong bool) (caseItem, bool) {
		it := caseItem{line: line}
		if tooLong {
			it.err = &corpus.ReadError{File: name, Line: line, Msg: fmt.Sprintf("longer than %d bytes", corpus.MaxLineBytes)}
		} else if c, err := corpus.ParseCase(b); err != nil {
			it.err = &corpus.ReadError{File: name, Line: line, Msg: err.Error()}
		} else {
			it.c = c
		}
		return it, it.err != nil
	}, func(err error) caseItem {
		return caseItem{err: &corpus.ReadError{File: name, Msg: err.Error()}}
	})
}

// readAnswers reads the answers' lines into batches on out (see
// corpus.ReadAnswers for what makes a line unusable), ending with a stray
// line if the file cannot be read on; it gives up when quit closes.
func readAnswers(name string, r io.Reader, out chan<- []answerItem, quit <-chan struct{}) {
	readBatches(r, out, quit, func(line int, b []byte, tooLong bool) (answerItem, bool) {
		var it answerItem
		if tooLong {
			it.bad = fmt.Sprintf("%s:%d: longer than %d bytes, not read", name, line, corpus.MaxLineBytes)
		} else if id, ok := corpus.AnswerID(b); !ok {
			it.bad = fmt.Sprintf("%s:%d: not a JSON object with a string id: %s", name, line, spec.Excerpt(b, 80))
		} else {
			it.a = corpus.Answer{ID: id, Raw: append(json.RawMessage(nil), b...), Line: line}
		}
		return it, false
	}, func(err error) answerItem {
		return answerItem{bad: fmt.Sprintf("%s: reading stopped: %v", name, err)}
	})
}

// errLast stops readBatches after an item that ends the stream.
var errLast = errors.New("the last item")

// readBatches sends r's lines, each made an item by item, in batches on
// out, and closes out at the end: after an item that item marks last, or
// after the item failed makes of a read error. It gives up when quit
// closes.
func readBatches[T any](r io.Reader, out chan<- []T, quit <-chan struct{}, item func(line int, b []byte, tooLong bool) (T, bool), failed func(error) T) {
	defer close(out)
	batch := make([]T, 0, streamBatch)
	send := func() bool {
		select {
		case out <- batch:
			batch = make([]T, 0, streamBatch)
			return true
		case <-quit:
			return false
		}
	}
	err := corpus.EachLine(r, func(line int, b []byte, tooLong bool) error {
		it, last := item(line, b, tooLong)
		batch = append(batch, it)
		if last {
			return errLast
		}
		if len(batch) == streamBatch && !send() {
			return io.EOF
		}
		return nil
	})
	if err != nil && err != io.EOF && err != errLast {
		batch = append(batch, failed(err))
	}
	if len(batch) > 0 {
		send()
	}
}

// caseState is what the matcher knows of a corpus id: the case's line, and
// whether its answer came.
type caseState struct {
	line     int32
	answered bool
}

// idKey is an id's 128-bit hash, under two seeds drawn per run, which the
// matcher keeps for every id instead of the id itself (a third of the
// memory). Two of n distinct ids share a key with probability below
// n²·2⁻¹²⁹ (a billion ids: 2·10⁻²¹), which would show as a repeated id,
// never pass silently.
type idKey [2]uint64

var idSeeds = [2]maphash.Seed{maphash.MakeSeed(), maphash.MakeSeed()}

func keyOf(id string) idKey {
	return idKey{maphash.String(idSeeds[0], id), maphash.String(idSeeds[1], id)}
}

// pendingCase is a case read before its answer, with its place in the
// corpus.
type pendingCase struct {
	c   corpus.Case
	seq int
}

// matcher pairs cases and answers read in lockstep: in the usual stream,
// where answers follow the corpus's order, each answer meets its case at
// once and nothing waits.
type matcher struct {
	ck             *Checker
	corpusName     string
	strays         []string // recorded once the workers are done
	seen           map[idKey]caseState
	pendingCases   map[string]pendingCase
	pendingAnswers map[string]corpus.Answer
	seq            int
	emit           func(casePair) bool // to the comparison, in order
}

// run reads one case and one answer at a time until both streams end, or
// the corpus turns out unusable.
func (m *matcher) run(caseCh <-chan []caseItem, ansCh <-chan []answerItem) error {
	var cs []caseItem
	var as []answerItem
	for caseCh != nil || ansCh != nil || len(cs) > 0 || len(as) > 0 {
		if len(cs) == 0 && caseCh != nil {
			var ok bool
			if cs, ok = <-caseCh; !ok {
				caseCh = nil
			}
		}
		if len(cs) > 0 {
			if err := m.addCase(cs[0]); err != nil {
				return err
			}
			cs = cs[1:]
		}
		if len(as) == 0 && ansCh != nil {
			var ok bool
			if as, ok = <-ansCh; !ok {
				ansCh = nil
			}
		}
		if len(as) > 0 {
			m.addAnswer(as[0])
			as = as[1:]
		}
	}
	return nil
}

func (m *matcher) addCase(it caseItem) error {
	if it.err != nil {
		return it.err
	}
	c := it.c
	key := keyOf(c.ID)
	if st, dup := m.seen[key]; dup {
		return &corpus.ReadError{File: m.corpusName, Line: it.line, Msg: fmt.Sprintf("id %q repeats line %d", c.ID, st.line)}
	}
	m.seq++
	if a, ok := m.pendingAnswers[c.ID]; ok {
		delete(m.pendingAnswers, c.ID)
		m.seen[key] = caseState{line: int32(it.line), answered: true}
		m.dispatch(c, a.Raw)
		return nil
	}
	m.seen[key] = caseState{line: int32(it.line)}
	m.pendingCases[c.ID] = pendingCase{c: c, seq: m.seq}
	return nil
}

func (m *matcher) addAnswer(it answerItem) {
	if it.bad != "" {
		m.strays = append(m.strays, it.bad)
		return
	}
	a := it.a
	key := keyOf(a.ID)
	st, known := m.seen[key]
	_, waiting := m.pendingAnswers[a.ID]
	switch {
	case known && st.answered || waiting:
		m.strays = append(m.strays, fmt.Sprintf("line %d: a second answer for %q (the first is used)", a.Line, a.ID))
	case known:
		pc := m.pendingCases[a.ID]
		delete(m.pendingCases, a.ID)
		m.seen[key] = caseState{line: st.line, answered: true}
		m.dispatch(pc.c, a.Raw)
	default:
		m.pendingAnswers[a.ID] = a
	}
}

// dispatch hands a matched pair on to be compared and recorded.
func (m *matcher) dispatch(c corpus.Case, got json.RawMessage) {
	m.emit(casePair{c, got})
}

// finish records the cases left without an answer (in corpus order) and
// the answers left without a case (in answer order).
func (m *matcher) finish() {
	for _, s := range m.strays {
		m.ck.Stray(s)
	}
	left := make([]pendingCase, 0, len(m.pendingCases))
	for _, pc := range m.pendingCases {
		left = append(left, pc)
	}
	slices.SortFunc(left, func(a, b pendingCase) int { return cmp.Compare(a.seq, b.seq) })
	for i := range left {
		m.ck.Check(&left[i].c, nil)
	}
	stray := make([]corpus.Answer, 0, len(m.pendingAnswers))
	for _, a := range m.pendingAnswers {
		stray = append(stray, a)
	}
	slices.SortFunc(stray, func(a, b corpus.Answer) int { return cmp.Compare(a.Line, b.Line) })
	for _, a := range stray {
		m.ck.Stray(fmt.Sprintf("line %d: answer for %q, which is no case of the corpus", a.Line, a.ID))
	}
}
