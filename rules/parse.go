package rules

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf16"
	"unicode/utf8"

	"github.com/santhosh-tekuri/jsonschema/v6"
	"github.com/santhosh-tekuri/jsonschema/v6/kind"
	"go.yaml.in/yaml/v3"
)

// Parse reads a rule set from YAML text (comments allowed; JSON is YAML too, so JSON rule files and the
// wire's rules object read the same way) and checks it: YAML syntax, the published schema ([Schema]),
// then [Set.Validate]. name is how messages call the text, usually the file's base name. On any problem
// it returns nil and an [Errors] whose every [Problem] carries name, the 1-based line and column of
// the offending YAML node and the field path, as in
//
//	phone.yaml:7:14: bands[1].zoom: 31 is outside [0, 30]
//
// Warnings are [Lint]'s business; Parse accepts a rule set that only has warnings.
func Parse(data []byte, name string) (*Set, error) {
	set, fs := check(data, name, false)
	var errs Errors
	for _, f := range fs {
		if f.Severity == SeverityError {
			errs = append(errs, &Problem{Kind: f.Kind, Field: f.Field, Msg: f.Message, File: f.File, Line: f.Line, Col: f.Col})
		}
	}
	if len(errs) > 0 {
		return nil, errs
	}
	return set, nil
}

// Lint reads a rule set like [Parse] and returns every finding: the errors Parse would report and, when
// there are none, the warnings of a rule set that works but cannot mean what its author wanted (see
// [KindZoomRises], [KindWideHysteresis], [KindTurnInert]). Findings are sorted by line, column, severity
// (errors first), field and message; there is at most one error per field (the first stage that finds a
// problem with a field reports it). A clean rule set gives an empty slice.
func Lint(data []byte, name string) []Finding {
	_, fs := check(data, name, true)
	if fs == nil {
		fs = []Finding{}
	}
	return fs
}

// Limits on what the loader expands: a rule set has a few dozen values, and these bounds keep a hostile
// file (an alias bomb, a deeply nested list) from costing more than a moment.
const (
	maxValues = 10000
	maxDepth  = 64
)

// checker holds one run of the loader over one text.
type checker struct {
	file     string
	findings []Finding
	val      map[string]*yaml.Node // field path → the node holding its value
	key      map[string]*yaml.Node // field path → the node of its key
	expand   map[*yaml.Node]bool   // anchors whose alias is being expanded, to catch cycles
	values   int
	overflow bool
	// structural is set by any error that leaves the document without the shape of a rule set; the
	// semantic pass runs only on a document without one.
	structural bool
}

func check(data []byte, name string, wantWarnings bool) (set *Set, fs []Finding) {
	if name == "" {
		name = "input"
	}
	c := &checker{file: name, val: map[string]*yaml.Node{}, key: map[string]*yaml.Node{}, expand: map[*yaml.Node]bool{}}
	defer func() {
		// The YAML parser turns its own failures into errors; this is a last guard so that no text,
		// however broken, makes the loader panic.
		if r := recover(); r != nil {
			set = nil
			fs = []Finding{{Severity: SeverityError, Kind: KindSyntax, File: name, Line: 1,
				Message: fmt.Sprintf("the YAML parser failed: %v", r)}}
		}
	}()
	data, ok := c.checkText(data)
	if !ok {
		return nil, c.finish()
	}
	root := c.parseYAML(data)
	if root == nil {
		return nil, c.finish()
	}
	inst := c.convert(root, "", 0)
	if c.overflow {
		return nil, c.finish()
	}
	deferred := c.validateSchema(inst)
	if !c.structural {
		var s Set
		if err := root.Decode(&s); err != nil {
			// The schema has accepted the shape, so this is not expected; report it rather than guess.
			c.add(SeverityError, KindType, "", root, "cannot decode: "+err.Error())
			return nil, c.finish()
		}
		for _, e := range s.appendErrors(nil) {
			c.add(SeverityError, e.Kind, e.Field, c.nodeFor(e.Field), e.Msg)
		}
		if !c.hasErrors() {
			set = &s
			if wantWarnings {
				for _, w := range s.warnings() {
					c.add(SeverityWarning, w.Kind, w.Field, c.nodeFor(w.Field), w.Msg)
				}
			}
		}
	} else {
		c.findings = append(c.findings, deferred...)
	}
	fs = c.finish()
	if c.hasErrors() {
		set = nil
	}
	return set, fs
}

func (c *checker) hasErrors() bool {
	for _, f := range c.findings {
		if f.Severity == SeverityError {
			return true
		}
	}
	return false
}

// finish drops repeated errors on one field (the first stage's report stands) and sorts.
func (c *checker) finish() []Finding {
	seen := map[string]bool{}
	out := c.findings[:0]
	for _, f := range c.findings {
		k := f.Severity.String() + "\x00" + f.Kind.String() + "\x00" + f.Field
		if f.Severity == SeverityError {
			k = "error\x00" + f.Field
		}
		if f.Field != "" && seen[k] {
			continue
		}
		seen[k] = true
		out = append(out, f)
	}
	sort.SliceStable(out, func(i, j int) bool {
		a, b := out[i], out[j]
		if a.Line != b.Line {
			return a.Line < b.Line
		}
		if a.Col != b.Col {
			return a.Col < b.Col
		}
		if a.Severity != b.Severity {
			return a.Severity < b.Severity
		}
		if a.Field != b.Field {
			return a.Field < b.Field
		}
		return a.Message < b.Message
	})
	c.findings = out
	return out
}

func (c *checker) add(sev Severity, k ProblemKind, field string, n *yaml.Node, msg string) {
	c.findings = append(c.findings, c.finding(sev, k, field, n, msg))
}

// finding places a finding at node n, or at line 1 when there is no node.
func (c *checker) finding(sev Severity, k ProblemKind, field string, n *yaml.Node, msg string) Finding {
	line, col := 1, 0
	if n != nil && n.Line > 0 {
		line, col = n.Line, n.Column
	}
	return Finding{Severity: sev, Kind: k, File: c.file, Line: line, Col: col, Field: field, Message: msg}
}

func (c *checker) addLine(k ProblemKind, line, col int, msg string) {
	if line < 1 {
		line, col = 1, 0
	}
	c.findings = append(c.findings, Finding{Severity: SeverityError, Kind: k, File: c.file, Line: line, Col: col, Message: msg})
}

// nodeFor finds the node to blame for a field: its value, else (for a missing field) the nearest
// enclosing value, else the document.
func (c *checker) nodeFor(field string) *yaml.Node {
	for {
		if n, ok := c.val[field]; ok {
			return n
		}
		if field == "" {
			return nil
		}
		field = parentPath(field)
	}
}

// parentPath drops the last step of a path built by childPath or indexPath.
func parentPath(p string) string {
	if strings.HasSuffix(p, "]") {
		// An index or a quoted key: find its opening bracket outside quotes.
		inQuote := false
		for i := len(p) - 2; i >= 0; i-- {
			switch {
			case p[i] == '"' && (i == 0 || p[i-1] != '\\'):
				inQuote = !inQuote
			case p[i] == '[' && !inQuote:
				return p[:i]
			}
		}
		return ""
	}
	if i := strings.LastIndexByte(p, '.'); i >= 0 {
		return p[:i]
	}
	return ""
}

var plainKey = regexp.MustCompile(`^[A-Za-z_][A-Za-z0-9_]*$`)

// childPath names field key of the object at path: "turn.within_m", or `x["odd key"]` for a key that
// is not a plain name.
func childPath(path, key string) string {
	if !plainKey.MatchString(key) {
		return path + "[" + strconv.Quote(key) + "]"
	}
	if path == "" {
		return key
	}
	return path + "." + key
}

func indexPath(path string, i int) string { return path + "[" + strconv.Itoa(i) + "]" }

// Where the YAML parser reports a line, its parser (as opposed to its scanner) counts lines from 0; these
// are the parser's messages, so that their line can be put right.
var parserProblems = []string{
	"did not find expected <stream-start>",
	"did not find expected <document start>",
	"found undefined tag handle",
	"did not find expected node content",
	"did not find expected '-' indicator",
	"did not find expected key",
	"did not find expected ',' or ']'",
	"did not find expected ',' or '}'",
	"found duplicate %YAML directive",
	"found incompatible YAML document",
	"found duplicate %TAG directive",
}

var yamlLine = regexp.MustCompile(`^yaml: line (\d+): (.*)$`)
var unknownAnchor = regexp.MustCompile(`^yaml: unknown anchor '(.*)' referenced$`)

// checkText returns the text as UTF-8 without a byte order mark, ready for the YAML parser, or records
// the first character the parser would refuse and returns false. The YAML parser refuses invalid UTF-8
// and control characters too, but names no place (its reader reports them all on line 1), so the text
// is scanned here first and the character is reported at its own line and column: lines end at LF, CR
// LF or a lone CR, and columns count characters from 1 (an invalid byte counts as one), as the YAML
// parser counts them for every other finding. A UTF-16 text with its byte order mark, which the YAML
// parser also reads, is turned into UTF-8 first, and positions are those of its characters.
func (c *checker) checkText(data []byte) ([]byte, bool) {
	text, bad := textOf(data)
	if bad == nil {
		bad = badChar(text)
	}
	if bad == nil {
		return text, true
	}
	c.addLine(KindSyntax, bad.line, bad.col, bad.msg)
	c.structural = true
	return nil, false
}

// badText is the first character of a text that a rule file may not hold, and where it is.
type badText struct {
	line, col int // 1-based; col counts characters
	msg       string
}

// textOf returns data as UTF-8 without a byte order mark: as it is when it is not UTF-16, or decoded from
// UTF-16 when it starts with a UTF-16 byte order mark (FF FE little-endian, FE FF big-endian). A UTF-16
// text of odd length is reported at its end, an unpaired surrogate at its character.
func textOf(data []byte) ([]byte, *badText) {
	var big bool
	switch {
	case bytes.HasPrefix(data, []byte{0xEF, 0xBB, 0xBF}):
		return data[3:], nil
	case bytes.HasPrefix(data, []byte{0xFF, 0xFE}):
	case bytes.HasPrefix(data, []byte{0xFE, 0xFF}):
		big = true
	default:
		return data, nil
	}
	units := make([]uint16, 0, len(data)/2)
	for i := 2; i+1 < len(data); i += 2 {
		if big {
			units = append(units, uint16(data[i])<<8|uint16(data[i+1]))
		} else {
			units = append(units, uint16(data[i+1])<<8|uint16(data[i]))
		}
	}
	var out []byte
	var pos textPos
	for i := 0; i < len(units); i++ {
		r := rune(units[i])
		switch {
		case utf16.IsSurrogate(r) && i+1 < len(units) && utf16.DecodeRune(r, rune(units[i+1])) != utf8.RuneError:
			r = utf16.DecodeRune(r, rune(units[i+1]))
			i++
		case utf16.IsSurrogate(r):
			return nil, &badText{pos.line(), pos.col(), fmt.Sprintf("unpaired UTF-16 surrogate %#04x: not a character", units[i])}
		}
		out = utf8.AppendRune(out, r)
		pos.next(r)
	}
	if len(data)%2 == 1 {
		return nil, &badText{pos.line(), pos.col(), "a UTF-16 text (it starts with a UTF-16 byte order mark) of an odd number of bytes: its last byte is half a character"}
	}
	return out, nil
}

// textPos counts lines and characters as the YAML parser does: a line ends at LF, CR LF or a lone CR.
type textPos struct {
	lines, cols int // 0-based
	cr          bool
}

func (p *textPos) line() int { return p.lines + 1 }
func (p *textPos) col() int  { return p.cols + 1 }

// next moves past the character r.
func (p *textPos) next(r rune) {
	switch {
	case r == '\n' && p.cr: // the LF of a CR LF: the CR ended the line
		p.cr = false
	case r == '\n' || r == '\r':
		p.lines, p.cols, p.cr = p.lines+1, 0, r == '\r'
	default:
		p.cols++
		p.cr = false
	}
}

// badChar finds the first byte of text that is not UTF-8 or is a character YAML does not allow in a
// document: a control character other than tab, LF and CR (C0, DEL, or C1 including NEL), a surrogate
// (which is not UTF-8) or the noncharacters U+FFFE and U+FFFF. It says how many more follow, so that one
// message tells how damaged the text is.
func badChar(text []byte) *badText {
	var first *badText
	more := 0
	var pos textPos
	for i := 0; i < len(text); {
		r, size := utf8.DecodeRune(text[i:])
		var msg string
		switch {
		case r == utf8.RuneError && size <= 1:
			msg = fmt.Sprintf("byte %#02x is not UTF-8: a rule file is UTF-8 text", text[i])
		case r == '\t' || r == '\n' || r == '\r':
		case r < 0x20 || (r >= 0x7F && r <= 0x9F):
			msg = fmt.Sprintf("control character U+%04X: YAML allows no control character but tab, line feed and carriage return", r)
		case r == 0xFFFE || r == 0xFFFF:
			msg = fmt.Sprintf("U+%04X is not a character: YAML does not allow it", r)
		}
		if msg != "" {
			if first == nil {
				first = &badText{pos.line(), pos.col(), msg}
			} else {
				more++
			}
		}
		pos.next(r)
		i += size
	}
	if first != nil && more > 0 {
		first.msg += fmt.Sprintf(" (and %d more after it)", more)
	}
	return first
}

// parseYAML reads exactly one YAML document and returns its root node, or nil after recording why not.
func (c *checker) parseYAML(data []byte) *yaml.Node {
	dec := yaml.NewDecoder(bytes.NewReader(data))
	var doc yaml.Node
	if err := dec.Decode(&doc); err != nil {
		if errors.Is(err, io.EOF) {
			c.addLine(KindSyntax, 1, 0, "empty document: no rule set")
			c.structural = true
			return nil
		}
		c.syntaxError(err, data)
		return nil
	}
	var extra yaml.Node
	if err := dec.Decode(&extra); err == nil {
		c.addLine(KindSyntax, extra.Line, extra.Column, "a second YAML document: a rule file holds one rule set")
		return nil
	} else if !errors.Is(err, io.EOF) {
		c.syntaxError(err, data)
		return nil
	}
	if doc.Kind != yaml.DocumentNode || len(doc.Content) != 1 {
		c.addLine(KindSyntax, doc.Line, doc.Column, "not a YAML document")
		return nil
	}
	return doc.Content[0]
}

func (c *checker) syntaxError(err error, data []byte) {
	msg := err.Error()
	line, col := 1, 0
	if m := yamlLine.FindStringSubmatch(msg); m != nil {
		line, _ = strconv.Atoi(m[1])
		msg = m[2]
		for _, p := range parserProblems {
			if msg == p {
				line++
				break
			}
		}
	} else if m := unknownAnchor.FindStringSubmatch(msg); m != nil {
		msg = "alias *" + m[1] + " refers to no anchor &" + m[1]
		if i := bytes.Index(data, []byte("*"+m[1])); i >= 0 {
			line = 1 + bytes.Count(data[:i], []byte("\n"))
			col = 1 + len([]rune(string(data[bytes.LastIndexByte(data[:i], '\n')+1:i])))
		}
	} else {
		msg = strings.TrimPrefix(msg, "yaml: ")
	}
	c.addLine(KindSyntax, line, col, "YAML: "+msg)
	c.structural = true
}

// convert turns a YAML node into the JSON value the schema checks (map[string]any, []any, float64,
// string, bool, nil), recording where each field's key and value sit. Numbers that are not finite are
// reported here and given to the schema as 0, so that each problem is told once.
func (c *checker) convert(n *yaml.Node, path string, depth int) any {
	if c.overflow {
		return nil
	}
	c.values++
	if c.values > maxValues {
		c.overflow = true
		c.structural = true
		c.add(SeverityError, KindSyntax, path, n, fmt.Sprintf("more than %d values (after expanding aliases): far more than any rule set holds", maxValues))
		return nil
	}
	if depth > maxDepth {
		c.overflow = true
		c.structural = true
		c.add(SeverityError, KindSyntax, path, n, fmt.Sprintf("nested more than %d deep", maxDepth))
		return nil
	}
	if _, ok := c.val[path]; !ok {
		c.val[path] = n
	}
	switch n.Kind {
	case yaml.AliasNode:
		if n.Alias == nil || c.expand[n.Alias] {
			c.structural = true
			c.add(SeverityError, KindSyntax, path, n, "alias *"+n.Value+" refers to a value that contains it")
			return nil
		}
		c.expand[n.Alias] = true
		v := c.convert(n.Alias, path, depth+1)
		delete(c.expand, n.Alias)
		return v
	case yaml.MappingNode:
		m := make(map[string]any, len(n.Content)/2)
		seen := map[string]*yaml.Node{}
		for i := 0; i+1 < len(n.Content); i += 2 {
			k, v := n.Content[i], n.Content[i+1]
			if k.Kind != yaml.ScalarNode {
				c.structural = true
				c.add(SeverityError, KindSyntax, path, k, "a field name must be a plain scalar, not "+describe(k))
				continue
			}
			cp := childPath(path, k.Value)
			if first, dup := seen[k.Value]; dup {
				c.structural = true
				c.add(SeverityError, KindDuplicate, cp, k, fmt.Sprintf("given twice in one object (first on line %d)", first.Line))
				continue
			}
			seen[k.Value] = k
			c.key[cp] = k
			m[k.Value] = c.convert(v, cp, depth+1)
		}
		return m
	case yaml.SequenceNode:
		s := make([]any, len(n.Content))
		for i, v := range n.Content {
			s[i] = c.convert(v, indexPath(path, i), depth+1)
		}
		return s
	case yaml.ScalarNode:
		return c.scalar(n, path)
	}
	c.structural = true
	c.add(SeverityError, KindSyntax, path, n, "unexpected YAML node")
	return nil
}

func (c *checker) scalar(n *yaml.Node, path string) any {
	switch n.ShortTag() {
	case "!!null":
		return nil
	case "!!bool":
		var b bool
		if err := n.Decode(&b); err == nil {
			return b
		}
	case "!!int", "!!float":
		var f float64
		if err := n.Decode(&f); err != nil {
			c.structural = true
			c.add(SeverityError, KindType, path, n, fmt.Sprintf("%q is not a number that fits a float64", n.Value))
			return nil
		}
		if math.IsNaN(f) || math.IsInf(f, 0) {
			c.add(SeverityError, KindNotFinite, path, n, notFiniteMsg(f))
			return 0.0
		}
		return f
	case "!!str":
		// YAML reads a plain number too large for a float64 (1e400) as a string; say what it is.
		if n.Style&(yaml.DoubleQuotedStyle|yaml.SingleQuotedStyle|yaml.LiteralStyle|yaml.FoldedStyle) == 0 {
			if _, err := strconv.ParseFloat(n.Value, 64); errors.Is(err, strconv.ErrRange) {
				c.structural = true // the value cannot be decoded into a Set either
				c.add(SeverityError, KindNotFinite, path, n, n.Value+" is too large for a float64, so not a finite number")
				return 0.0
			}
		}
	}
	return n.Value
}

// describe says what a YAML node holds, for messages: `string "abc"`, `a list`, `!foo "5"`.
func describe(n *yaml.Node) string {
	for n.Kind == yaml.AliasNode && n.Alias != nil {
		n = n.Alias
	}
	switch n.Kind {
	case yaml.MappingNode:
		return "an object"
	case yaml.SequenceNode:
		return "a list"
	}
	v := n.Value
	if len(v) > 40 {
		v = v[:40] + "…"
	}
	switch t := n.ShortTag(); t {
	case "!!str":
		return "string " + strconv.Quote(v)
	case "!!null":
		return "null"
	case "!!bool":
		return "boolean " + v
	case "!!int", "!!float":
		return "number " + v
	case "!!timestamp":
		return "timestamp " + v
	default:
		// A tag can hold any character once its %-escapes are decoded; keep messages on one line.
		if strings.ContainsFunc(t, func(r rune) bool { return !unicode.IsGraphic(r) }) {
			t = strconv.Quote(t)
		}
		return t + " " + strconv.Quote(v)
	}
}

// knownFields lists the fields each object of a rule set has, for the unknown-field message.
func knownFields(path string) string {
	switch {
	case path == "":
		return "bands, hysteresis_kmh, max_zoom_rate_per_s, max_pitch_rate_deg_per_s, turn, min_zoom, max_zoom, max_turn_rate_deg_per_s"
	case path == "turn":
		return "within_m, min_angle_deg, zoom"
	case strings.HasPrefix(path, "bands["):
		return "below_kmh, zoom, pitch_deg"
	}
	return ""
}

// validateSchema checks the converted document against the published schema. Structural problems are
// recorded at once; range and which-band-is-open problems are returned instead, for use only when the
// semantic pass (which words them the same way) cannot run.
func (c *checker) validateSchema(inst any) (deferred []Finding) {
	sch, err := compiledSchema()
	if err != nil {
		c.structural = true
		c.addLine(KindSyntax, 1, 0, err.Error())
		return nil
	}
	verr := sch.Validate(inst)
	if verr == nil {
		return nil
	}
	var ve *jsonschema.ValidationError
	if !errors.As(verr, &ve) {
		c.structural = true
		c.addLine(KindSyntax, 1, 0, verr.Error())
		return nil
	}
	var out []Finding
	c.walkSchemaError(inst, ve, &out)
	return out
}

func (c *checker) walkSchemaError(inst any, ve *jsonschema.ValidationError, deferred *[]Finding) {
	path, v := locate(inst, ve.InstanceLocation)
	node := c.nodeFor(path)
	leaf := path[strings.LastIndexAny(path, ".[")+1:]
	switch k := ve.ErrorKind.(type) {
	case *kind.Required:
		for _, m := range k.Missing {
			c.structural = true
			c.add(SeverityError, KindMissing, childPath(path, m), node, "missing")
		}
		return
	case *kind.AdditionalProperties:
		for _, p := range k.Properties {
			c.structural = true
			cp := childPath(path, p)
			msg := "unknown field"
			if known := knownFields(path); known != "" {
				msg += " (the fields here are " + known + ")"
			}
			c.add(SeverityError, KindUnknown, cp, c.key[cp], msg)
		}
		return
	case *kind.Type:
		c.structural = true
		if v == nil && node != nil && node.Kind != yaml.MappingNode {
			// "zoom:" with nothing after it, or an explicit null: the value was left out.
			c.add(SeverityError, KindMissing, path, node, "no value (null), want "+wantType(k.Want))
			return
		}
		c.add(SeverityError, KindType, path, node, "got "+describe(node)+", want "+wantType(k.Want))
		return
	case *kind.MinItems:
		c.structural = true
		c.add(SeverityError, KindMissing, path, node, msgNoBands)
		return
	case *kind.Minimum, *kind.Maximum, *kind.ExclusiveMinimum, *kind.ExclusiveMaximum:
		f, _ := v.(float64)
		r, ok := fieldRanges[leaf]
		msg := rangeMsg(f, r)
		if !ok {
			msg = fmtNum(f) + " is out of range"
		}
		*deferred = append(*deferred, c.finding(SeverityError, KindRange, path, node, msg))
		return
	case *kind.MinContains, *kind.Contains:
		// No band lacks below_kmh: the last one should.
		// (A last item that is not an object, or whose below_kmh is not a number, has its own error.)
		if arr, ok := v.([]any); ok && len(arr) > 0 {
			band, _ := arr[len(arr)-1].(map[string]any)
			if edge, ok := band["below_kmh"].(float64); ok {
				f := indexPath(path, len(arr)-1) + ".below_kmh"
				*deferred = append(*deferred, c.finding(SeverityError, KindLastEdge, f, c.nodeFor(f), lastEdgeMsg(edge)))
			}
		}
		return
	case *kind.MaxContains:
		// More than one band lacks below_kmh: all but the last need one.
		arr, _ := v.([]any)
		for _, i := range k.Got {
			if i != len(arr)-1 {
				f := indexPath(path, i) + ".below_kmh"
				*deferred = append(*deferred, c.finding(SeverityError, KindMissing, f, c.nodeFor(f), msgMissingEdge))
			}
		}
		return
	}
	if len(ve.Causes) == 0 {
		c.structural = true
		c.add(SeverityError, KindType, path, node, "does not match the schema (keyword "+strings.Join(ve.ErrorKind.KeywordPath(), "/")+")")
		return
	}
	for _, cause := range ve.Causes {
		c.walkSchemaError(inst, cause, deferred)
	}
}

func wantType(want []string) string {
	words := make([]string, len(want))
	for i, w := range want {
		switch w {
		case "number":
			words[i] = "a number"
		case "object":
			words[i] = "an object"
		case "array":
			words[i] = "a list"
		default:
			words[i] = w
		}
	}
	return strings.Join(words, " or ")
}

// locate follows a JSON Pointer's tokens through the document, returning the field path and the value.
func locate(inst any, loc []string) (string, any) {
	path, v := "", inst
	for _, tok := range loc {
		switch cur := v.(type) {
		case []any:
			i, err := strconv.Atoi(tok)
			if err != nil || i < 0 || i >= len(cur) {
				return path, nil
			}
			path, v = indexPath(path, i), cur[i]
		case map[string]any:
			path, v = childPath(path, tok), cur[tok]
		default:
			return path, nil
		}
	}
	return path, v
}
