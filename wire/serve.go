package wire

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"reflect"
	"strconv"
	"strings"
	"sync"

	jsonv2 "github.com/go-json-experiment/json"
	"github.com/go-json-experiment/json/jsontext"

	"github.com/viewspec/viewspec/spec"
)

// MaxLineBytes is the longest request line Serve reads; a longer line is
// answered with a line_too_long error and skipped.
const MaxLineBytes = 16 << 20

// Answerer answers one request: the answer value (marshalled as a JSON
// object), or an error, a *spec.FieldError when the request is at fault.
type Answerer func(req *Request) (any, error)

// Serve answers the JSON Lines requests on r with answer, one answer line
// on w for each request line, in order. A line that cannot be answered gets
// an error object and the stream goes on; blank lines are skipped. It
// returns at the end of r, or on the first read or write error. Memory
// stays bounded by the longest line, whatever the stream's length.
func Serve(r io.Reader, w io.Writer, answer Answerer) error {
	br := bufio.NewReaderSize(r, 64<<10)
	bw := bufio.NewWriterSize(w, 64<<10)
	var long []byte
	var out []byte
	for lineNo := 1; ; lineNo++ {
		// Flush before a read that may block, so that a peer speaking one
		// line at a time gets its answer.
		if br.Buffered() == 0 {
			if err := bw.Flush(); err != nil {
				return err
			}
		}
		line, err := br.ReadSlice('\n')
		tooLong := false
		if errors.Is(err, bufio.ErrBufferFull) {
			long = append(long[:0], line...)
			for errors.Is(err, bufio.ErrBufferFull) {
				line, err = br.ReadSlice('\n')
				if len(long)+len(line) > MaxLineBytes {
					tooLong = true
				} else {
					long = append(long, line...)
				}
			}
			line = long
		}
		if err != nil && err != io.EOF {
			return err
		}
		if len(line) == 0 && err == io.EOF {
			return bw.Flush()
		}
		out = out[:0]
		if tooLong {
			out = appendError(out, nil, CodeLineTooLong, fmt.Sprintf("line %d: longer than %d bytes", lineNo, MaxLineBytes))
		} else if trimmed := bytes.TrimSpace(line); len(trimmed) > 0 {
			out = answerLine(out, lineNo, trimmed, answer)
		} else if err == io.EOF {
			return bw.Flush()
		} else {
			continue // a blank line is not a request
		}
		out = append(out, '\n')
		if _, werr := bw.Write(out); werr != nil {
			return werr
		}
		if err == io.EOF {
			return bw.Flush()
		}
	}
}

// AnswerLine returns answer's answer line (without the newline) to one
// request line, as Serve would write it for line number lineNo.
func AnswerLine(line []byte, lineNo int, answer Answerer) []byte {
	return answerLine(nil, lineNo, bytes.TrimSpace(line), answer)
}

// answerLine appends the answer to one request line.
func answerLine(out []byte, lineNo int, line []byte, answer Answerer) []byte {
	var req Request
	if err := DecodeRequest(line, &req); err != nil {
		code, msg := DecodeError(err)
		return appendError(out, req.ID, code, fmt.Sprintf("line %d: %s", lineNo, msg))
	}
	ans, err := answer(&req)
	if err != nil {
		return appendError(out, req.ID, Code(err), fmt.Sprintf("line %d: %v", lineNo, err))
	}
	b, err := Marshal(ans)
	if err != nil {
		// Answers hold only finite numbers; a failure here is a broken
		// invariant of the evaluator, reported rather than hidden.
		return appendError(out, req.ID, CodeInvalid, fmt.Sprintf("line %d: cannot encode the answer: %v", lineNo, err))
	}
	return append(out, b...)
}

// Marshal encodes v as one line of JSON without escaping <, > and &, which
// the wire has no reason to hide. Encoders and their buffers are reused.
func Marshal(v any) ([]byte, error) {
	if b, ok := fastMarshal(v); ok {
		return b, nil
	}
	e := encoders.Get().(*lineEncoder)
	defer encoders.Put(e)
	e.buf.Reset()
	if err := e.enc.Encode(v); err != nil {
		return nil, err
	}
	return bytes.Clone(bytes.TrimSuffix(e.buf.Bytes(), []byte{'\n'})), nil
}

type lineEncoder struct {
	buf bytes.Buffer
	enc *json.Encoder
}

var encoders = sync.Pool{New: func() any {
	e := &lineEncoder{}
	e.enc = json.NewEncoder(&e.buf)
	e.enc.SetEscapeHTML(false)
	return e
}}

// DecodeError names what was wrong with JSON that did not decode into a
// wire type: a wire error code and a message naming the field.
func DecodeError(err error) (code, msg string) {
	var fe *spec.FieldError
	var syn *jsontext.SyntacticError
	var sem *jsonv2.SemanticError
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	switch {
	case errors.As(err, &fe):
		return Code(fe), fe.Error()
	case errors.As(err, &syn):
		return CodeMalformed, fmt.Sprintf("malformed JSON at byte %d: %v", syn.ByteOffset, syn.Err)
	case errors.As(err, &sem):
		field := pointerPath(sem.JSONPointer)
		if field == "" {
			return CodeMalformed, fmt.Sprintf("a request must be a JSON object, got %s", kindName(sem.JSONKind))
		}
		if sem.JSONKind == '0' && sem.GoType != nil && sem.GoType.Kind() == reflect.Float64 {
			// A number too large for a double: the right JSON type, but not
			// a finite value.
			return CodeInvalid, fmt.Sprintf("%s = %s: not a finite number", field, sem.JSONValue)
		}
		want := "a value of another type"
		if sem.GoType != nil {
			want = jsonKind(sem.GoType.Kind().String())
		}
		return CodeBadType, fmt.Sprintf("%s: expected %s, got %s", field, want, kindName(sem.JSONKind))
	case errors.As(err, &se):
		return CodeMalformed, fmt.Sprintf("malformed JSON at byte %d: %v", se.Offset, err)
	case errors.As(err, &te):
		if te.Field == "" {
			return CodeMalformed, fmt.Sprintf("a request must be a JSON object, got %s", te.Value)
		}
		return CodeBadType, fmt.Sprintf("%s: expected %s, got %s", te.Field, jsonKind(te.Type.Kind().String()), te.Value)
	}
	return CodeMalformed, err.Error()
}

// kindName names a JSON kind for people.
func kindName(k jsontext.Kind) string {
	switch k {
	case 'n':
		return "null"
	case 'f', 't':
		return "a boolean"
	case '"':
		return "a string"
	case '0':
		return "a number"
	case '{':
		return "an object"
	case '[':
		return "an array"
	}
	return "something else"
}

// jsonKind names a Go kind the way a JSON writer thinks of it.
func jsonKind(k string) string {
	switch k {
	case "float64", "int", "int64":
		return "a number"
	case "string":
		return "a string"
	case "slice":
		return "an array"
	case "struct", "map", "ptr":
		return "an object"
	case "bool":
		return "true or false"
	}
	return k
}

func appendError(out []byte, id json.RawMessage, code, msg string) []byte {
	b, _ := Marshal(ErrorAnswer{Head: Head{ID: id}, Error: ErrorBody{Code: code, Message: msg}})
	return append(out, b...)
}

// Code returns the wire error code of an answerer's error: by its kind for
// a *spec.FieldError (missing_field, bad_type, invalid_value), and
// invalid_value for any other.
func Code(err error) string {
	var ue *UnknownOpError
	if errors.As(err, &ue) {
		return CodeUnknownOp
	}
	var fe *spec.FieldError
	if errors.As(err, &fe) {
		switch fe.Kind {
		case spec.Missing:
			return CodeMissing
		case spec.BadType:
			return CodeBadType
		}
	}
	return CodeInvalid
}

// UnknownOpError is the error of a request whose op the answerer does not
// speak; Known lists those it does.
type UnknownOpError struct {
	Op    string
	Known []string
}

func (e *UnknownOpError) Error() string {
	op := e.Op
	if len(op) > 40 {
		op = op[:40] + "…"
	}
	return "op: unknown op " + strconv.Quote(op) + " (known: " + strings.Join(e.Known, ", ") + ")"
}
