package check

import (
	"cmp"
	"encoding/json"
	"encoding/xml"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/viewspec/viewspec/corpus"
	"github.com/viewspec/viewspec/spec"
)

// CaseResult is the outcome of one case.
type CaseResult struct {
	ID     string `json:"id"`
	Op     string `json:"op"`
	Family string `json:"family"`
	Status Status `json:"status"`
	Diffs  []Diff `json:"diffs,omitempty"`
	// Note says why a case is missing or skipped, or what went wrong
	// with the implementation around it.
	Note string `json:"note,omitempty"`
}

// Counts tallies outcomes.
type Counts struct {
	Pass       int `json:"pass"`
	Borderline int `json:"borderline"`
	Fail       int `json:"fail"`
	Missing    int `json:"missing"`
	Skipped    int `json:"skipped"`
}

func (c *Counts) add(s Status) {
	switch s {
	case Pass:
		c.Pass++
	case Borderline:
		c.Borderline++
	case Fail:
		c.Fail++
	case Missing:
		c.Missing++
	case Skipped:
		c.Skipped++
	}
}

// Total returns the number of cases counted.
func (c Counts) Total() int { return c.Pass + c.Borderline + c.Fail + c.Missing + c.Skipped }

// WorstDiff is one of the largest differences, with its case.
type WorstDiff struct {
	CaseID  string          `json:"case"`
	Diff    Diff            `json:"diff"`
	Request json.RawMessage `json:"request"`
}

// Report is the outcome of checking answers against a corpus.
type Report struct {
	Profile  string             `json:"profile"`
	Counts   Counts             `json:"counts"`
	ByOp     map[string]*Counts `json:"by_op"`
	ByFamily map[string]*Counts `json:"by_family"`
	// Worst lists the 10 largest differences (relative to their
	// tolerance) among failed and borderline cases, worst first.
	Worst []WorstDiff `json:"worst"`
	// Stray lists answer lines that matched no case, or were unreadable.
	Stray []string `json:"stray,omitempty"`
	// Trouble is what went wrong with a live implementation, if anything:
	// it hung, crashed, exited early or printed what is not an answer.
	Trouble []string `json:"trouble,omitempty"`
	// NotPassed lists every case that failed, is missing or is borderline,
	// in the order they were decided (the text report shows the worst;
	// machines get all).
	NotPassed []CaseResult `json:"not_passed"`
	Cases     []CaseResult `json:"-"`
}

// Checked returns the number of cases compared with an answer (skipped and
// missing ones are not).
func (c Counts) Checked() int { return c.Pass + c.Borderline + c.Fail }

// Failed reports whether any case failed or is missing, or no case was
// checked at all: a run that compared nothing proves nothing.
func (r *Report) Failed() bool {
	return r.Counts.Fail > 0 || r.Counts.Missing > 0 || r.Counts.Checked() == 0
}

// Verdict says in a few words why the report passes or fails.
func (r *Report) Verdict() string {
	c := r.Counts
	switch {
	case c.Checked() == 0 && c.Total() == 0:
		return "no cases: the corpus is empty"
	case c.Checked() == 0:
		return fmt.Sprintf("no case checked: all %d skipped or missing", c.Total())
	}
	return fmt.Sprintf("%d failed, %d missing", c.Fail, c.Missing)
}

// Checker accumulates case results into a report.
type Checker struct {
	// KeepCases keeps every case's result in the report (Report.Cases,
	// which the JUnit file lists in full); without it only the results
	// not passed are kept, so that memory does not grow with the corpus.
	KeepCases bool

	p     Profile
	r     Report
	worst []WorstDiff
	fams  map[[2]string]*Counts
}

// NewChecker starts a report under profile p.
func NewChecker(p Profile) *Checker {
	return &Checker{p: p, r: Report{Profile: p.Name, ByOp: map[string]*Counts{}, ByFamily: map[string]*Counts{}, NotPassed: []CaseResult{}},
		fams: map[[2]string]*Counts{}}
}

// Check compares one case with its answer (nil when there is none) and
// records the outcome.
func (ck *Checker) Check(c *corpus.Case, got json.RawMessage) CaseResult {
	res := compareCase(c, got, &ck.p)
	ck.add(c, res)
	return res
}

// compareCase returns the outcome of one case and its answer (nil when
// there is none) under profile p; it records nothing, so that cases can be
// compared on several cores and recorded in order.
func compareCase(c *corpus.Case, got json.RawMessage, p *Profile) CaseResult {
	res := CaseResult{ID: c.ID, Op: c.Op, Family: c.Family}
	if got == nil {
		res.Status, res.Note = Missing, "no answer"
	} else {
		res.Status, res.Diffs = Compare(c, got, p)
	}
	return res
}

// add records a compared case: its outcome and its largest differences.
func (ck *Checker) add(c *corpus.Case, res CaseResult) {
	for _, d := range res.Diffs {
		ck.worst = append(ck.worst, WorstDiff{CaseID: c.ID, Diff: d, Request: c.Request})
	}
	if len(ck.worst) > 64 {
		ck.trimWorst()
	}
	ck.Record(res)
}

// Record adds a result decided elsewhere (skipped, or missing with a note).
func (ck *Checker) Record(res CaseResult) {
	ck.r.Counts.add(res.Status)
	op := ck.r.ByOp[res.Op]
	if op == nil {
		op = &Counts{}
		ck.r.ByOp[res.Op] = op
	}
	op.add(res.Status)
	// Looked up by the pair, so that no key string is built per case.
	fam := ck.fams[[2]string{res.Op, res.Family}]
	if fam == nil {
		fam = &Counts{}
		ck.fams[[2]string{res.Op, res.Family}] = fam
		ck.r.ByFamily[res.Op+"/"+res.Family] = fam
	}
	fam.add(res.Status)
	if res.Status != Pass && res.Status != Skipped {
		ck.r.NotPassed = append(ck.r.NotPassed, res)
	}
	if ck.KeepCases {
		ck.r.Cases = append(ck.r.Cases, res)
	}
}

// Stray records an answer that belongs to no case.
func (ck *Checker) Stray(msg string) { ck.r.Stray = append(ck.r.Stray, msg) }

func (ck *Checker) trimWorst() {
	slices.SortStableFunc(ck.worst, func(a, b WorstDiff) int { return cmp.Compare(b.Diff.Ratio, a.Diff.Ratio) })
	if len(ck.worst) > 10 {
		ck.worst = ck.worst[:10]
	}
}

// Trouble records what went wrong with a live implementation.
func (ck *Checker) Trouble(msg string) { ck.r.Trouble = append(ck.r.Trouble, msg) }

// Report returns the report so far.
func (ck *Checker) Report() *Report {
	ck.trimWorst()
	ck.r.Worst = append([]WorstDiff(nil), ck.worst...)
	if ck.r.Worst == nil {
		ck.r.Worst = []WorstDiff{}
	}
	return &ck.r
}

// CheckAnswers checks answers (matched by id) against the corpus.
func CheckAnswers(cases []corpus.Case, answers []corpus.Answer, bad []string, p Profile) *Report {
	ck := NewChecker(p)
	ck.KeepCases = true
	byID := make(map[string]json.RawMessage, len(answers))
	for _, a := range answers {
		if _, dup := byID[a.ID]; dup {
			ck.Stray(fmt.Sprintf("line %d: a second answer for %q (the first is used)", a.Line, a.ID))
			continue
		}
		byID[a.ID] = a.Raw
	}
	known := make(map[string]bool, len(cases))
	for i := range cases {
		known[cases[i].ID] = true
		ck.Check(&cases[i], byID[cases[i].ID])
	}
	for _, a := range answers {
		if !known[a.ID] {
			ck.Stray(fmt.Sprintf("line %d: answer for %q, which is no case of the corpus", a.Line, a.ID))
		}
	}
	for _, b := range bad {
		ck.Stray(b)
	}
	return ck.Report()
}

// WriteText prints the report for people: totals, a table per op and per
// family, and the worst differences with their requests.
func (r *Report) WriteText(w io.Writer) error {
	c := r.Counts
	verdict := "PASS"
	if r.Failed() {
		verdict = "FAIL"
	}
	fmt.Fprintf(w, "%s: %d cases under the %s profile: %d pass, %d borderline, %d fail, %d missing, %d skipped (%s of the corpus)\n",
		verdict, c.Total(), r.Profile, c.Pass, c.Borderline, c.Fail, c.Missing, c.Skipped, percent(c.Skipped, c.Total()))
	if c.Checked() == 0 {
		fmt.Fprintf(w, "%s: nothing was compared, so nothing is shown to agree\n", r.Verdict())
	}
	fmt.Fprintln(w)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "op / family\tpass\tborderline\tfail\tmissing\tskipped\t")
	for _, op := range sortedKeys(r.ByOp) {
		k := r.ByOp[op]
		fmt.Fprintf(tw, "%s\t%d\t%d\t%d\t%d\t%d\t\n", op, k.Pass, k.Borderline, k.Fail, k.Missing, k.Skipped)
		for _, fam := range sortedKeys(r.ByFamily) {
			if !strings.HasPrefix(fam, op+"/") {
				continue
			}
			k := r.ByFamily[fam]
			fmt.Fprintf(tw, "  %s\t%d\t%d\t%d\t%d\t%d\t\n", strings.TrimPrefix(fam, op+"/"), k.Pass, k.Borderline, k.Fail, k.Missing, k.Skipped)
		}
	}
	tw.Flush()
	if len(r.Worst) > 0 {
		fmt.Fprintf(w, "\nworst differences:\n")
		for i, wd := range r.Worst {
			d := wd.Diff
			kind := "fail"
			if d.Borderline {
				kind = "borderline"
			}
			fmt.Fprintf(w, "%2d. %s  %s (%s): got %s, want %s", i+1, wd.CaseID, d.Path, kind, d.Got, d.Want)
			switch {
			case d.Diff > 0:
				fmt.Fprintf(w, " — off by %s, %s tolerance %s", fmtF(d.Diff), d.Quantity, fmtF(d.Allowed))
			case d.Quantity != "shape":
				fmt.Fprintf(w, " — %s decision, tolerance %s", d.Quantity, fmtF(d.Allowed))
			}
			if d.Note != "" {
				fmt.Fprintf(w, " (%s)", d.Note)
			}
			fmt.Fprintf(w, "\n    request: %s\n", spec.Excerpt(wd.Request, 400))
		}
	}
	missing := 0
	for _, cr := range r.NotPassed {
		if cr.Status == Missing && cr.Note != "no answer" && missing < 10 {
			fmt.Fprintf(w, "missing %s: %s\n", cr.ID, cr.Note)
			missing++
		}
	}
	for i, s := range r.Stray {
		if i == 10 {
			fmt.Fprintf(w, "… and %d more stray answers\n", len(r.Stray)-10)
			break
		}
		fmt.Fprintf(w, "stray answer: %s\n", s)
	}
	return nil
}

// percent formats n/total as a percentage, "0%" when total is 0.
func percent(n, total int) string {
	if total == 0 {
		return "0%"
	}
	return strconv.FormatFloat(100*float64(n)/float64(total), 'g', 3, 64) + "%"
}

func sortedKeys[V any](m map[string]V) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	return keys
}

// JUnit XML (the format CI systems read): one test suite per op, one test
// case per fixture.
type junitSuites struct {
	XMLName  xml.Name     `xml:"testsuites"`
	Name     string       `xml:"name,attr"`
	Tests    int          `xml:"tests,attr"`
	Failures int          `xml:"failures,attr"`
	Skipped  int          `xml:"skipped,attr"`
	Suites   []junitSuite `xml:"testsuite"`
}

type junitSuite struct {
	Name     string      `xml:"name,attr"`
	Tests    int         `xml:"tests,attr"`
	Failures int         `xml:"failures,attr"`
	Skipped  int         `xml:"skipped,attr"`
	Cases    []junitCase `xml:"testcase"`
}

type junitCase struct {
	Name      string        `xml:"name,attr"`
	Classname string        `xml:"classname,attr"`
	Failure   *junitFailure `xml:"failure,omitempty"`
	Skipped   *junitSkipped `xml:"skipped,omitempty"`
	SystemOut string        `xml:"system-out,omitempty"`
}

type junitFailure struct {
	Message string `xml:"message,attr"`
	Type    string `xml:"type,attr"`
	Text    string `xml:",chardata"`
}

type junitSkipped struct {
	Message string `xml:"message,attr"`
}

// WriteJUnit writes the report as JUnit XML: every case when the checker
// kept them all (Checker.KeepCases), else the cases not passed.
func (r *Report) WriteJUnit(w io.Writer) error {
	suites := map[string]*junitSuite{}
	out := junitSuites{Name: "viewspec (" + r.Profile + ")"}
	cases := r.Cases
	if cases == nil {
		cases = r.NotPassed
	}
	for _, cr := range cases {
		s := suites[cr.Op]
		if s == nil {
			s = &junitSuite{Name: cr.Op}
			suites[cr.Op] = s
		}
		jc := junitCase{Name: cr.ID, Classname: "viewspec." + cr.Op + "." + cr.Family}
		describe := func() string {
			var b strings.Builder
			if cr.Note != "" {
				b.WriteString(cr.Note + "\n")
			}
			for _, d := range cr.Diffs {
				fmt.Fprintf(&b, "%s: got %s, want %s (%s, off by %s, tolerance %s) %s\n", d.Path, d.Got, d.Want, d.Quantity, fmtF(d.Diff), fmtF(d.Allowed), d.Note)
			}
			return b.String()
		}
		switch cr.Status {
		case Fail, Missing:
			jc.Failure = &junitFailure{Message: cr.headline(), Type: cr.Status.String(), Text: describe()}
			s.Failures++
			out.Failures++
		case Skipped:
			jc.Skipped = &junitSkipped{Message: cr.Note}
			s.Skipped++
			out.Skipped++
		case Borderline:
			jc.SystemOut = "borderline: " + describe()
		}
		s.Tests++
		out.Tests++
		s.Cases = append(s.Cases, jc)
	}
	for _, op := range sortedKeys(suites) {
		out.Suites = append(out.Suites, *suites[op])
	}
	if _, err := io.WriteString(w, xml.Header); err != nil {
		return err
	}
	enc := xml.NewEncoder(w)
	enc.Indent("", "  ")
	if err := enc.Encode(out); err != nil {
		return err
	}
	_, err := io.WriteString(w, "\n")
	return err
}

// headline says in one line what went wrong with a case: its first
// difference with the field, both values and how far apart, or its note.
func (cr *CaseResult) headline() string {
	if len(cr.Diffs) == 0 {
		if cr.Note != "" {
			return cr.Status.String() + ": " + cr.Note
		}
		return cr.Status.String()
	}
	d := cr.Diffs[0]
	msg := fmt.Sprintf("%s: %s: got %s, want %s", cr.Status, d.Path, d.Got, d.Want)
	if d.Diff > 0 {
		msg += fmt.Sprintf(" (off by %s, %s tolerance %s)", fmtF(d.Diff), d.Quantity, fmtF(d.Allowed))
	}
	if n := len(cr.Diffs); n > 1 {
		msg += fmt.Sprintf(" and %d more", n-1)
	}
	return msg
}
