package viewport

import "math"

// markerGrid buckets points of the Mercator plane into a uniform grid, so
// that a tick of the drive timeline tests only the markers near its
// footprint. Cells hold indices in compressed rows: the markers of cell c
// are items[start[c]:start[c+1]].
type markerGrid struct {
	minX, minY float64
	cellM      float64 // cell side, Mercator metres
	nx, ny     int
	start      []int32
	items      []int32
	buf        []span // spans' result, reused
}

// span is a run of positions in the grid's order, items[lo:hi], and the X
// shift (Mercator metres) that brings those points next to the box they
// were found for.
type span struct {
	lo, hi int32
	shiftM float64
}

// newMarkerGrid builds a grid of about one cell per point over the points'
// bounding box.
func newMarkerGrid(pts []Mercator) markerGrid {
	g := markerGrid{minX: math.Inf(1), minY: math.Inf(1)}
	maxX, maxY := math.Inf(-1), math.Inf(-1)
	for _, p := range pts {
		g.minX, maxX = min(g.minX, p.X), max(maxX, p.X)
		g.minY, maxY = min(g.minY, p.Y), max(maxY, p.Y)
	}
	side := int(math.Ceil(math.Sqrt(float64(len(pts)))))
	g.cellM = max(maxX-g.minX, maxY-g.minY, 1) / float64(max(side, 1))
	g.nx = int((maxX-g.minX)/g.cellM) + 1
	g.ny = int((maxY-g.minY)/g.cellM) + 1
	if len(pts) == 0 {
		g.nx, g.ny = 0, 0
	}
	g.start = make([]int32, g.nx*g.ny+1)
	cells := make([]int32, len(pts))
	for i, p := range pts {
		c := g.cellOf(p)
		cells[i] = int32(c)
		g.start[c+1]++
	}
	for c := 1; c < len(g.start); c++ {
		g.start[c] += g.start[c-1]
	}
	g.items = make([]int32, len(pts))
	fill := append([]int32(nil), g.start[:len(g.start)-1]...)
	for i, c := range cells {
		g.items[fill[c]] = int32(i)
		fill[c]++
	}
	return g
}

func (g *markerGrid) cellOf(p Mercator) int {
	cx := min(int((p.X-g.minX)/g.cellM), g.nx-1)
	cy := min(int((p.Y-g.minY)/g.cellM), g.ny-1)
	return cy*g.nx + cx
}

// spans returns the runs of grid positions of the points whose cells meet the
// box [minX, maxX] × [minY, maxY] (a superset of the points inside it), one
// run per row of cells. The box may pass ±πR in X; the parts beyond are
// looked up a world away, and their runs carry the shift that brings those
// points back next to the box. The result is valid until the next call.
func (g *markerGrid) spans(minX, minY, maxX, maxY float64) []span {
	g.buf = g.buf[:0]
	g.addSpans(minX, minY, maxX, maxY, 0)
	if maxX > worldWidthM/2 {
		g.addSpans(max(minX, worldWidthM/2)-worldWidthM, minY, maxX-worldWidthM, maxY, worldWidthM)
	}
	if minX < -worldWidthM/2 {
		g.addSpans(minX+worldWidthM, minY, min(maxX, -worldWidthM/2)+worldWidthM, maxY, -worldWidthM)
	}
	return g.buf
}

func (g *markerGrid) addSpans(minX, minY, maxX, maxY, shiftM float64) {
	if g.nx == 0 {
		return
	}
	x0 := math.Floor((minX - g.minX) / g.cellM)
	x1 := math.Floor((maxX - g.minX) / g.cellM)
	y0 := math.Floor((minY - g.minY) / g.cellM)
	y1 := math.Floor((maxY - g.minY) / g.cellM)
	if x1 < 0 || y1 < 0 || x0 >= float64(g.nx) || y0 >= float64(g.ny) {
		return
	}
	cx0, cx1 := int(max(x0, 0)), int(min(x1, float64(g.nx-1)))
	cy0, cy1 := int(max(y0, 0)), int(min(y1, float64(g.ny-1)))
	for cy := cy0; cy <= cy1; cy++ {
		row := cy * g.nx
		if lo, hi := g.start[row+cx0], g.start[row+cx1+1]; hi > lo {
			g.buf = append(g.buf, span{lo, hi, shiftM})
		}
	}
}
