package viewport_test

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
	"pgregory.net/rapid"

	"github.com/viewspec/viewspec/props"
	"github.com/viewspec/viewspec/viewport"
)

// glCamera is the same camera built the way a renderer builds it: a look-at
// view matrix and a perspective projection matrix (OpenGL Programming Guide,
// gluLookAt and gluPerspective), composed with gonum. It shares no code with
// the closed form in view.go; only the camera's inputs are common.
type glCamera struct {
	vp     *mat.Dense // projection × view
	w, h   float64
	offset [3]float64 // added to a ground point to place the user at the anchor
}

func normalize(v [3]float64) [3]float64 {
	n := math.Sqrt(v[0]*v[0] + v[1]*v[1] + v[2]*v[2])
	return [3]float64{v[0] / n, v[1] / n, v[2] / n}
}

func cross(a, b [3]float64) [3]float64 {
	return [3]float64{a[1]*b[2] - a[2]*b[1], a[2]*b[0] - a[0]*b[2], a[0]*b[1] - a[1]*b[0]}
}

func dot(a, b [3]float64) float64 { return a[0]*b[0] + a[1]*b[1] + a[2]*b[2] }

// lookAt is gluLookAt's matrix.
func lookAt(eye, centre, up [3]float64) *mat.Dense {
	f := normalize([3]float64{centre[0] - eye[0], centre[1] - eye[1], centre[2] - eye[2]})
	s := normalize(cross(f, normalize(up)))
	u := cross(s, f)
	return mat.NewDense(4, 4, []float64{
		s[0], s[1], s[2], -dot(s, eye),
		u[0], u[1], u[2], -dot(u, eye),
		-f[0], -f[1], -f[2], dot(f, eye),
		0, 0, 0, 1,
	})
}

// perspective is gluPerspective's matrix.
func perspective(fovYDeg, aspect, near, far float64) *mat.Dense {
	f := 1 / math.Tan(fovYDeg*math.Pi/180/2)
	return mat.NewDense(4, 4, []float64{
		f / aspect, 0, 0, 0,
		0, f, 0, 0,
		0, 0, (far + near) / (near - far), 2 * far * near / (near - far),
		0, 0, -1, 0,
	})
}

// newGLCamera builds the renderer's camera in a world of pixels centred on
// the user: x east, y north, z up, ground at z = 0. The eye sits f pixels
// from the screen centre's ground point, tilted back by the pitch; the user is
// then put at the anchor by casting the anchor pixel's ray to the ground.
func newGLCamera(c viewport.Camera) glCamera {
	d := c.Device
	f := d.HeightPx / 2 / math.Tan(d.FovYDeg*math.Pi/180/2)
	beta, theta := c.HeadingDeg*math.Pi/180, c.PitchDeg*math.Pi/180
	fwd := [3]float64{math.Sin(beta), math.Cos(beta), 0}
	zUp := [3]float64{0, 0, 1}
	eye := [3]float64{
		f * (-math.Sin(theta)*fwd[0] + math.Cos(theta)*zUp[0]),
		f * (-math.Sin(theta)*fwd[1] + math.Cos(theta)*zUp[1]),
		f * (-math.Sin(theta)*fwd[2] + math.Cos(theta)*zUp[2]),
	}
	up := [3]float64{
		math.Cos(theta)*fwd[0] + math.Sin(theta)*zUp[0],
		math.Cos(theta)*fwd[1] + math.Sin(theta)*zUp[1],
		math.Sin(theta),
	}
	var vp mat.Dense
	vp.Mul(perspective(d.FovYDeg, d.WidthPx/d.HeightPx, f/1000, 1000*f*d.FarRatio), lookAt(eye, [3]float64{}, up))
	g := glCamera{vp: &vp, w: d.WidthPx, h: d.HeightPx}

	// The anchor pixel's ray: unproject its NDC point at the near and far
	// planes through the inverse matrix and meet the ground.
	var inv mat.Dense
	if err := inv.Inverse(&vp); err != nil {
		panic(err)
	}
	ax := d.AnchorX*d.WidthPx/d.WidthPx*2 - 1
	ay := 1 - d.AnchorY*2
	var ends [2][3]float64
	for i, z := range [2]float64{-1, 1} {
		var p mat.VecDense
		p.MulVec(&inv, mat.NewVecDense(4, []float64{ax, ay, z, 1}))
		w := p.AtVec(3)
		ends[i] = [3]float64{p.AtVec(0) / w, p.AtVec(1) / w, p.AtVec(2) / w}
	}
	s := ends[0][2] / (ends[0][2] - ends[1][2])
	g.offset = [3]float64{
		ends[0][0] + s*(ends[1][0]-ends[0][0]),
		ends[0][1] + s*(ends[1][1]-ends[0][1]),
		0,
	}
	return g
}

// pixel returns the screen pixel (y down) of the ground point east, north
// world pixels from the user, and its clip w (the depth along the view axis).
func (g glCamera) pixel(east, north float64) (viewport.Pixel, float64) {
	var clip mat.VecDense
	clip.MulVec(g.vp, mat.NewVecDense(4, []float64{east + g.offset[0], north + g.offset[1], 0, 1}))
	w := clip.AtVec(3)
	return viewport.Pixel{
		X: (clip.AtVec(0)/w + 1) / 2 * g.w,
		Y: (1 - clip.AtVec(1)/w) / 2 * g.h,
	}, w
}

// The closed-form projection and the matrix route land on the same pixel
// within 1e-6 px (plus the float64 resolution of Mercator coordinates far
// from the origin), and agree on the depth.
func TestProjectMatchesGLMatrices(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		c := props.Camera().Draw(t, "camera")
		if math.Abs(c.LatDeg) > 84 {
			t.Skip("latitude clamped")
		}
		v := mustPrepare(t, c)
		if v.Wrapped() {
			t.Skip("view wider than half the world")
		}
		fp := v.Footprint()
		if fp.Empty {
			t.Skip("empty footprint")
		}
		gl := newGLCamera(c)
		// A ground point around the footprint, drawn in world pixels from
		// the user.
		s := v.ScalePxPerM()
		u := v.UserMercator()
		k := rapid.IntRange(0, 3).Draw(t, "vertex")
		a := rapid.Float64Range(0, 1.2).Draw(t, "toward")
		east := a * (fp.Mercator[k].X - u.X) * s
		north := a * (fp.Mercator[k].Y - u.Y) * s
		m := viewport.Mercator{X: u.X + east/s, Y: u.Y + north/s}
		if math.Abs(m.X-v.Target().X) >= math.Pi*viewport.EarthRadiusM {
			// Half a world or more from the target: Project takes the copy
			// the short way round, the matrices the one drawn.
			t.Skip("point half a world away")
		}
		sp := v.ProjectMercator(m)
		want, depth := gl.pixel(east, north)
		if depth <= 0 || !sp.HasPixel() {
			if sp.HasPixel() != (depth > 0) {
				t.Fatalf("HasPixel = %v, but the matrix route's depth is %v", sp.HasPixel(), depth)
			}
			return
		}
		tol := roundTripTolPx(&v, m, sp, 0)
		// The matrix route rounds in its own way: a 4×4 inverse and products
		// of numbers as large as the far plane, ~1e-12 of the pixel offset.
		tol += 1e-12 * (math.Abs(want.X) + math.Abs(want.Y)) * v.FocalPx() / depth
		if d := math.Hypot(sp.X-want.X, sp.Y-want.Y); d > tol {
			t.Fatalf("Project = %v, matrices give %v: off by %.3g px, tolerance %.3g px", sp.Pixel(), want, d, tol)
		}
		if math.Abs(sp.DepthPx-depth) > 1e-9*depth+tol {
			t.Fatalf("depth %v, matrices give %v", sp.DepthPx, depth)
		}
	})
}
