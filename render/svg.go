package render

import (
	"bytes"
	"encoding/xml"
	"strings"
)

// svgNS is the SVG namespace, written on standalone pictures only: HTML
// puts an inline <svg> in it by itself.
const svgNS = "http://www.w3.org/2000/svg"

// writer builds markup; attributes are name, value pairs, escaped here.
type writer struct {
	b bytes.Buffer
}

// esc returns s escaped for XML text and attribute values.
func esc(s string) string {
	var b strings.Builder
	xml.EscapeText(&b, []byte(s))
	return b.String()
}

func (w *writer) attrs(kv []string) {
	for i := 0; i+1 < len(kv); i += 2 {
		w.b.WriteByte(' ')
		w.b.WriteString(kv[i])
		w.b.WriteString(`="`)
		w.b.WriteString(esc(kv[i+1]))
		w.b.WriteByte('"')
	}
}

// open writes <name attrs…>.
func (w *writer) open(name string, kv ...string) {
	w.b.WriteByte('<')
	w.b.WriteString(name)
	w.attrs(kv)
	w.b.WriteString(">")
}

// close writes </name> and a line break.
func (w *writer) close(name string) {
	w.b.WriteString("</" + name + ">\n")
}

// empty writes <name attrs…/>.
func (w *writer) empty(name string, kv ...string) {
	w.b.WriteByte('<')
	w.b.WriteString(name)
	w.attrs(kv)
	w.b.WriteString("/>\n")
}

// text writes <name attrs…>text</name>.
func (w *writer) text(name, text string, kv ...string) {
	w.open(name, kv...)
	w.b.WriteString(esc(text))
	w.close(name)
}

// inline writes <name attrs…>text</name> with no line break after it, for
// text that runs on around it.
func (w *writer) inline(name, text string, kv ...string) {
	w.open(name, kv...)
	w.b.WriteString(esc(text))
	w.b.WriteString("</" + name + ">")
}

// raw writes s as it is.
func (w *writer) raw(s string) { w.b.WriteString(s) }

// points writes x,y pairs for a points attribute.
func points(xy [][2]float64) string {
	var b strings.Builder
	for i, p := range xy {
		if i > 0 {
			b.WriteByte(' ')
		}
		b.WriteString(num(p[0]))
		b.WriteByte(',')
		b.WriteString(num(p[1]))
	}
	return b.String()
}
