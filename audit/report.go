package audit

import (
	"bytes"
	"fmt"
	"html"
	"math"
	"sort"
	"strings"

	"github.com/paulmach/orb"

	"github.com/viewspec/viewspec/render"
	"github.com/viewspec/viewspec/timeline"
	"github.com/viewspec/viewspec/viewport"
)

// Colours of the audit's pictures: the project's code (render's legend),
// the reference in blue, the phone in reddish purple, each with its own
// shape so that no reading depends on colour.
const (
	colRef   = "#0072b2"
	colPhone = "#cc79a7"
	colInk   = "#222222"
	colGrid  = "#d9d9d9"
)

// ReliabilitySVG draws the reliability diagram of one bucket's predictions:
// each non-empty bin's mean predicted probability (x) against the fraction
// that came true (y), against the reference's outcomes (blue circles) and
// the phone's (purple squares), sized by the bin's count, over the
// diagonal of perfect calibration.
func ReliabilitySVG(ref, phone BucketScoreOut) []byte {
	const w, h, pad = 320.0, 320.0, 44.0
	side := w - 2*pad
	X := func(p float64) float64 { return pad + p*side }
	Y := func(p float64) float64 { return h - pad - p*side }
	var b bytes.Buffer
	fmt.Fprintf(&b, `<svg xmlns="http://www.w3.org/2000/svg" width="%g" height="%g" viewBox="0 0 %g %g" font-family="sans-serif" font-size="11">`, w, h+34, w, h+34)
	fmt.Fprintf(&b, `<title>reliability of p_%s</title><rect width="100%%" height="100%%" fill="#fff"/>`, ref.Bucket)
	for i := 0; i <= 10; i++ {
		p := float64(i) / 10
		fmt.Fprintf(&b, `<line x1="%.1f" y1="%.1f" x2="%.1f" y2="%.1f" stroke="%s"/>`, X(p), Y(0), X(p), Y(1), colGrid)
		fmt.Fprintf(&b, `<line x1="%.1f" y1="%.1f" x2="%.1f" y2="%.1f" stroke="%s"/>`, X(0), Y(p), X(1), Y(p), colGrid)
		if i%2 == 0 {
			fmt.Fprintf(&b, `<text x="%.1f" y="%.1f" text-anchor="middle">%g</text>`, X(p), Y(0)+14, p)
			fmt.Fprintf(&b, `<text x="%.1f" y="%.1f" text-anchor="end">%g</text>`, X(0)-4, Y(p)+4, p)
		}
	}
	fmt.Fprintf(&b, `<line x1="%.1f" y1="%.1f" x2="%.1f" y2="%.1f" stroke="%s" stroke-dasharray="4 3"/>`, X(0), Y(0), X(1), Y(1), colInk)
	fmt.Fprintf(&b, `<text x="%.1f" y="16" text-anchor="middle" font-weight="bold">p_%s: predicted vs observed</text>`, w/2, ref.Bucket)
	fmt.Fprintf(&b, `<text x="%.1f" y="%.1f" text-anchor="middle">mean predicted probability</text>`, w/2, h-8)
	fmt.Fprintf(&b, `<text transform="translate(12 %.1f) rotate(-90)" text-anchor="middle">fraction observed</text>`, h/2)
	var total int64
	for _, bin := range ref.Bins {
		total += bin.N
	}
	size := func(n int64) float64 { return 2.5 + 7*math.Sqrt(float64(n)/math.Max(1, float64(total))) }
	for _, bin := range ref.Bins {
		fmt.Fprintf(&b, `<circle cx="%.1f" cy="%.1f" r="%.1f" fill="none" stroke="%s" stroke-width="2"><title>reference: %d predictions, mean p %.3f, observed %.3f</title></circle>`,
			X(bin.MeanP), Y(bin.FracTrue), size(bin.N), colRef, bin.N, bin.MeanP, bin.FracTrue)
	}
	for _, bin := range phone.Bins {
		s := size(bin.N)
		fmt.Fprintf(&b, `<rect x="%.1f" y="%.1f" width="%.1f" height="%.1f" fill="%s" fill-opacity="0.6"><title>phone: %d predictions, mean p %.3f, observed %.3f</title></rect>`,
			X(bin.MeanP)-s/2, Y(bin.FracTrue)-s/2, s, s, colPhone, bin.N, bin.MeanP, bin.FracTrue)
	}
	ly := h + 8
	fmt.Fprintf(&b, `<circle cx="%.1f" cy="%.1f" r="5" fill="none" stroke="%s" stroke-width="2"/><text x="%.1f" y="%.1f">outcome by the reference (Brier %.4f)</text>`, pad, ly, colRef, pad+10, ly+4, ref.Brier)
	fmt.Fprintf(&b, `<rect x="%.1f" y="%.1f" width="9" height="9" fill="%s" fill-opacity="0.6"/><text x="%.1f" y="%.1f">outcome on the phone (Brier %.4f)</text>`, pad-4.5, ly+11, colPhone, pad+10, ly+20, phone.Brier)
	fmt.Fprintf(&b, `<text x="%.1f" y="%.1f" fill="#555">dashed: perfect calibration; size: predictions in the bin</text>`, pad, ly+34-8+12)
	b.WriteString(`</svg>`)
	return b.Bytes()
}

// Worst keeps the records with the most disagreements (ties: the smaller
// request id), at most K, whatever order the records come in; with ByTag,
// the worst record of each value of that tag (at most K values), so that
// every group that disagrees gets its picture.
type Worst struct {
	K     int
	ByTag string
	Keep  []*Result
}

// worse reports whether a ranks before b.
func worse(a, b *Result) bool {
	da, db := disagreements(a), disagreements(b)
	if da != db {
		return da > db
	}
	return a.Record.RequestID < b.Record.RequestID
}

// Add offers one record.
func (w *Worst) Add(r *Result) {
	if disagreements(r) == 0 {
		return
	}
	if w.ByTag != "" {
		v, _ := r.Record.Tag(w.ByTag)
		for i, k := range w.Keep {
			if kv, _ := k.Record.Tag(w.ByTag); kv == v {
				if worse(r, k) {
					w.Keep[i] = r
				}
				w.sort()
				return
			}
		}
	}
	w.Keep = append(w.Keep, r)
	w.sort()
	if len(w.Keep) > w.K {
		w.Keep = w.Keep[:w.K]
	}
}

func (w *Worst) sort() {
	sort.SliceStable(w.Keep, func(i, j int) bool { return worse(w.Keep[i], w.Keep[j]) })
}

func disagreements(r *Result) int {
	n := 0
	for i := range r.Outcomes {
		if r.Outcomes[i].Verdict == Disagree {
			n++
		}
	}
	return n
}

// Moment is a disagreement's picture: the screen and the map at the tick
// it happened, with what the phone displayed then.
type Moment struct {
	RequestID   string
	CandidateID string
	Cause       string
	Edge        string
	TickS       float64
	Screen, Map []byte
	Replay      string
}

// MomentOf draws the first disagreement of r (in candidate order) at its
// tick: the screen as the reference sees it, with the phone's displays at
// that moment haloed, and the north-up map.
func MomentOf(r *Result, names map[string]string, streets []render.Street) (*Moment, error) {
	k := -1
	for i := range r.Outcomes {
		if r.Outcomes[i].Verdict == Disagree {
			k = i
			break
		}
	}
	if k < 0 {
		return nil, nil
	}
	o := &r.Outcomes[k]
	rec := r.Record
	d := rec.Drive
	t := o.Ref.FirstShownS
	if o.Phone != nil && (!o.Ref.Shown || o.Phone.FirstShownS < t) {
		t = o.Phone.FirstShownS
	}
	tick := int(math.Round(t / d.TickS))
	m := &Moment{RequestID: rec.RequestID, CandidateID: o.ID, Cause: o.Cause, Edge: o.Edge, TickS: float64(tick) * d.TickS, Replay: ReplayLine(rec)}
	route := make([]orb.Point, len(rec.Fixes))
	for i, f := range rec.Fixes {
		route[i] = f.Point
	}
	// The phone's displays at the tick, from its intervals, or from its
	// first display when the log has none.
	var shown []string
	at := m.TickS
	for i := range r.Outcomes {
		p := r.Outcomes[i].Phone
		if p == nil {
			continue
		}
		on := p.FirstShownS <= at && at < p.FirstShownS+p.ShownS
		if p.Intervals != nil {
			on = false
			for _, iv := range p.Intervals {
				on = on || iv[0] <= at && at < iv[1]
			}
		}
		if on {
			shown = append(shown, r.Outcomes[i].ID)
		}
	}
	buckets := map[string]timeline.Bucket{}
	for i := range r.Outcomes {
		buckets[r.Outcomes[i].ID] = r.Outcomes[i].Ref.Bucket
	}
	var err error
	d.OnTick = func(k int, v *viewport.View, _ []int) {
		if k != tick || err != nil {
			return
		}
		opts := []render.Option{render.WithTitle(fmt.Sprintf("%s at %.2f s: %s (%s), haloed: displayed by the phone", rec.RequestID, m.TickS, o.ID, o.Cause))}
		if streets != nil {
			opts = append(opts, render.WithStreets(streets))
		}
		if names != nil {
			opts = append(opts, render.WithNames(names))
		}
		if m.Screen, err = render.ScreenSVG(v, render.Scene{Route: route, Streets: streets, Markers: rec.Candidates, Names: names, Shown: shown}, opts...); err != nil {
			return
		}
		m.Map, err = render.CameraSVG(v, route, rec.Candidates, buckets, render.WithTitle(fmt.Sprintf("%s at %.2f s, north up; markers by the reference's bucket", rec.RequestID, m.TickS)))
	}
	if _, cerr := timeline.Compute(&d, rec.Candidates); cerr != nil {
		return nil, cerr
	}
	return m, err
}

// ReportHTML returns the audit's report as one self-contained page: the
// summary, the findings with their replayable examples, the groups, the
// reliability diagrams and the worst records' moments.
func ReportHTML(s *Summary, moments []*Moment) []byte {
	var b bytes.Buffer
	e := html.EscapeString
	b.WriteString(`<!doctype html><html><head><meta charset="utf-8"><title>viewspec audit</title><style>
body{font-family:sans-serif;margin:24px;color:#222;max-width:1400px}table{border-collapse:collapse}td,th{border:1px solid #ccc;padding:3px 8px;text-align:right}
th{background:#f4f4f4}td.l,th.l{text-align:left}code{font-size:11px;word-break:break-all}.pics{display:flex;gap:12px;flex-wrap:wrap;align-items:flex-start}
.pics svg{max-width:640px;height:auto}details{margin:6px 0}</style></head><body>`)
	b.WriteString(`<h1>Display audit against the reference</h1>`)
	fmt.Fprintf(&b, `<p>%d records (%d bad), %d candidates: <b>%d agree</b>, <b>%d disagree</b> (%.2f%%, 95%% interval %.2f–%.2f%%), %d borderline. The phone displayed %d candidates; the reference shows %d.</p>`,
		s.Records, s.BadRecords, s.Candidates, s.Agree, s.Disagree, s.DisagreePct, s.DisagreePctCI95[0], s.DisagreePctCI95[1], s.Borderline, s.Displayed, s.Shown)
	b.WriteString(`<h2>Findings</h2>`)
	if len(s.Findings) == 0 {
		b.WriteString(`<p>None: no group disagrees beyond its rate threshold.</p>`)
	}
	b.WriteString(`<ul>`)
	for _, f := range s.Findings {
		fmt.Fprintf(&b, `<li>%s`, e(f.Text))
		if f.Example != nil {
			fmt.Fprintf(&b, `<details><summary>example: %s, replay with <code>viewspec eval</code></summary><code>%s</code></details>`, e(f.Example.RequestID), e(f.Example.Request))
		}
		b.WriteString(`</li>`)
	}
	b.WriteString(`</ul><h2>Groups</h2><table><tr><th class="l">group</th><th>records</th><th>candidates</th><th>agree</th><th>disagree</th><th>borderline</th><th>disagree %</th><th>95% interval</th><th>displayed</th><th>never visible</th><th>over cap</th><th>most at once (cap)</th></tr>`)
	for _, g := range s.Groups {
		fmt.Fprintf(&b, `<tr><td class="l">%s=%s</td><td>%d</td><td>%d</td><td>%d</td><td>%d</td><td>%d</td><td>%.2f</td><td>%.2f–%.2f</td><td>%d</td><td>%d</td><td>%d</td><td>%d (%d)</td></tr>`,
			e(g.Tag), e(g.Value), g.Records, g.Candidates, g.Agree, g.Disagree, g.Borderline, g.DisagreePct, g.DisagreePctCI95[0], g.DisagreePctCI95[1],
			g.Displayed, g.DisplayedNeverVisible, g.DisplayedOverCap, g.MaxOnScreen, g.MaxOnScreenCap)
	}
	b.WriteString(`</table>`)
	b.WriteString(`<h2>First-shown offsets</h2><p>The phone's first display minus the reference's first showing, in bins of 0.25 s; a constant lag shows as a peak away from 0.</p>`)
	b.Write(offsetsSVG(s))
	if sc := s.Scores; sc != nil {
		fmt.Fprintf(&b, `<h2>Predictions</h2><p>%d predictions scored per bucket (one against the rest): mean Brier score and log loss.</p><table><tr><th class="l">bucket</th><th>Brier (reference)</th><th>log loss (reference)</th><th>Brier (phone)</th><th>log loss (phone)</th></tr>`, sc.Predictions)
		for i := range 4 {
			fmt.Fprintf(&b, `<tr><td class="l">%s</td><td>%.4f</td><td>%.4f</td><td>%.4f</td><td>%.4f</td></tr>`, sc.Ref[i].Bucket, sc.Ref[i].Brier, sc.Ref[i].LogLoss, sc.Phone[i].Brier, sc.Phone[i].LogLoss)
		}
		b.WriteString(`</table><div class="pics">`)
		for i := range 4 {
			b.Write(ReliabilitySVG(sc.Ref[i], sc.Phone[i]))
		}
		b.WriteString(`</div>`)
	}
	if len(moments) > 0 {
		b.WriteString(`<h2>Worst records</h2><p>Each at its first disagreement: the screen as the reference projects it (haloed: what the phone displayed at that moment) and the map, north up.</p>`)
		for _, m := range moments {
			fmt.Fprintf(&b, `<h3>%s: %s at %.2f s — %s`, e(m.RequestID), e(m.CandidateID), m.TickS, e(strings.ReplaceAll(m.Cause, "_", " ")))
			if m.Edge != "" {
				fmt.Fprintf(&b, ` (decided at the %s)`, e(m.Edge))
			}
			fmt.Fprintf(&b, `</h3><div class="pics">%s%s</div><details><summary>replay</summary><code>%s</code></details>`, m.Screen, m.Map, e(m.Replay))
		}
	}
	b.WriteString(`</body></html>`)
	return b.Bytes()
}

// offsetsSVG draws the first-shown offsets as bars over [−10 s, 10 s].
func offsetsSVG(s *Summary) []byte {
	const w, h, pad = 820.0, 180.0, 36.0
	var b bytes.Buffer
	fmt.Fprintf(&b, `<svg xmlns="http://www.w3.org/2000/svg" width="%g" height="%g" font-family="sans-serif" font-size="11"><rect width="100%%" height="100%%" fill="#fff"/>`, w, h)
	var most int64 = 1
	for _, o := range s.Offsets {
		most = max(most, o.Count)
	}
	X := func(t float64) float64 { return pad + (t+OffsetRangeS)/(2*OffsetRangeS)*(w-2*pad) }
	for t := -10.0; t <= 10; t += 2 {
		fmt.Fprintf(&b, `<line x1="%.1f" y1="%g" x2="%.1f" y2="%g" stroke="%s"/><text x="%.1f" y="%g" text-anchor="middle">%+g s</text>`, X(t), pad/2, X(t), h-pad, colGrid, X(t), h-pad+14, t)
	}
	for _, o := range s.Offsets {
		lo, hi := -OffsetRangeS-OffsetBinS, OffsetRangeS+OffsetBinS
		if o.LoS != nil {
			lo = *o.LoS
		}
		if o.HiS != nil {
			hi = *o.HiS
		}
		lo, hi = max(lo, -OffsetRangeS-OffsetBinS), min(hi, OffsetRangeS+OffsetBinS)
		bh := (h - 1.5*pad) * float64(o.Count) / float64(most)
		fmt.Fprintf(&b, `<rect x="%.1f" y="%.1f" width="%.1f" height="%.1f" fill="%s"><title>%d displays</title></rect>`, X(lo), h-pad-bh, max(1, X(hi)-X(lo)-1), bh, colPhone, o.Count)
	}
	b.WriteString(`</svg>`)
	return b.Bytes()
}
