package render

import (
	"fmt"
	"math"

	"github.com/viewspec/viewspec/timeline"
)

// Option changes how a picture or page is drawn. Options that do not apply
// to a function are ignored by it.
type Option func(*settings)

type settings struct {
	mapW, mapH  float64
	spanGroundM float64
	title       string
	rulesName   string
	compareName string
	compare     *timeline.Drive
	streets     []Street
	names       map[string]string
}

func newSettings(opts []Option) (settings, error) {
	s := settings{mapW: defaultMapW, mapH: defaultMapH, rulesName: "rules"}
	for _, o := range opts {
		o(&s)
	}
	switch {
	case !(s.mapW >= 100 && s.mapW <= 20000) || !(s.mapH >= 100 && s.mapH <= 20000):
		return s, fmt.Errorf("render: map size %g×%g: each side must be within [100, 20000] picture units", s.mapW, s.mapH)
	case math.IsNaN(s.spanGroundM) || s.spanGroundM < 0 || math.IsInf(s.spanGroundM, 0):
		return s, fmt.Errorf("render: span %g m: must be finite and positive (or 0 to fit)", s.spanGroundM)
	}
	return s, nil
}

// WithMapSize sets the map area's width and height in picture units (each
// within [100, 20000]; default 640×640). The legend panel is added to the
// right of it.
func WithMapSize(widthUnits, heightUnits float64) Option {
	return func(s *settings) { s.mapW, s.mapH = widthUnits, heightUnits }
}

// WithSpanM fixes the map's scale: the shorter side of the map area spans
// spanM ground metres, with the user at the centre. Without it (or with 0)
// the map fits the footprint and the user (for a drive: the user's path,
// the first footprint and every marker in view at some tick).
func WithSpanM(spanM float64) Option {
	return func(s *settings) { s.spanGroundM = spanM }
}

// WithTitle sets the picture's or page's title (default: one made from the
// camera or the drive).
func WithTitle(title string) Option {
	return func(s *settings) { s.title = title }
}

// WithRulesName names the drive's rule set in a page's charts and tables
// (for example its file name; default "rules").
func WithRulesName(name string) Option {
	return func(s *settings) { s.rulesName = name }
}

// WithCompare adds a second drive to a page, named name: the same route,
// start and markers under another rule set. Its zoom and pitch are plotted
// beside the first drive's, and its buckets are listed beside the first's;
// the map shows the first drive only.
func WithCompare(name string, other *timeline.Drive) Option {
	return func(s *settings) { s.compareName, s.compare = name, other }
}

// WithStreets draws streets on a page's map and screen view, under the
// route.
func WithStreets(streets []Street) Option {
	return func(s *settings) { s.streets = streets }
}

// WithNames labels a page's markers by id with names (a business's name);
// markers without one are labelled with their id.
func WithNames(names map[string]string) Option {
	return func(s *settings) { s.names = names }
}
