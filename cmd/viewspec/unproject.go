package main

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/paulmach/orb"
	"github.com/spf13/cobra"

	"github.com/viewspec/viewspec/reference"
	"github.com/viewspec/viewspec/routes"
	"github.com/viewspec/viewspec/viewport"
	"github.com/viewspec/viewspec/wire"
)

func newUnprojectCmd() *cobra.Command {
	var cf cameraFlags
	var pixelArgs []string
	var pixelsFile string
	var asJSON bool
	cmd := &cobra.Command{
		Use:   "unproject",
		Short: "Print the ground point seen at each screen pixel",
		Long: `unproject prints, for each screen pixel (logical pixels, origin top-left,
x right, y down), the ground point seen there: its WGS84 latitude and
longitude and its geodesic distance from the user. A pixel at or above the
horizon sees no ground: the table says "above the horizon" and --json gives
null, as the wire's unproject op does (SPEC §2, §6). Pixels off the screen
are unprojected all the same.

Pixels come from --pixel X,Y (repeatable) and then --pixels FILE: CSV x,y,
one pixel a line, with an optional header line x,y and # for comments.`,
		Example: `  viewspec unproject --pixel 195,422 --pixel 0,0
  viewspec unproject --camera cam.json --pixels corners.csv --json`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if cf.file == "-" && pixelsFile == "-" {
				return &exitError{2, errors.New("--camera and --pixels cannot both read stdin")}
			}
			v, err := cf.view(cmd)
			if err != nil {
				return err
			}
			pxs, err := readPixels(cmd, pixelArgs, pixelsFile)
			if err != nil {
				return &exitError{2, err}
			}
			if len(pxs) == 0 {
				return &exitError{2, errors.New("no pixels: give --pixel X,Y or --pixels FILE")}
			}
			req := &wire.Request{Op: "unproject", Camera: wire.CameraOf(v.Camera())}
			for _, p := range pxs {
				req.Pixels = append(req.Pixels, &wire.Pixel{X: &p.X, Y: &p.Y})
			}
			ans, err := reference.Evaluate(req)
			if err != nil {
				return &exitError{2, err}
			}
			out := cmd.OutOrStdout()
			if asJSON {
				return writeJSON(out, struct {
					Request *wire.Request `json:"request"`
					Answer  any           `json:"answer"`
				}{req, ans})
			}
			return printUnproject(out, &v, pxs, ans.(*wire.UnprojectAnswer))
		},
	}
	cf.register(cmd)
	cmd.Flags().StringArrayVar(&pixelArgs, "pixel", nil, "a screen pixel `X,Y`, logical pixels from the top-left, y down (repeatable)")
	cmd.Flags().StringVar(&pixelsFile, "pixels", "", "read pixels from CSV `FILE` (- for stdin): x,y a line, optional header")
	cmd.Flags().BoolVar(&asJSON, "json", false, "print the wire answer (SPEC §6) with the request, as JSON; null for a pixel at or above the horizon")
	return cmd
}

// parsePixel reads "X,Y" in logical pixels, finite and within the wire's
// bound (±wire.MaxPixel).
func parsePixel(s string) (viewport.Pixel, error) {
	a, b, ok := strings.Cut(s, ",")
	if !ok {
		return viewport.Pixel{}, fmt.Errorf("%q: want X,Y", s)
	}
	var xy [2]float64
	for i, part := range [2]string{a, b} {
		name := [2]string{"x", "y"}[i]
		v, err := strconv.ParseFloat(strings.TrimSpace(part), 64)
		if err != nil {
			return viewport.Pixel{}, fmt.Errorf("%q: %s: %q is not a number", s, name, strings.TrimSpace(part))
		}
		if !(math.Abs(v) <= wire.MaxPixel) {
			return viewport.Pixel{}, fmt.Errorf("%q: %s = %v: pixel must be within [-1e9, 1e9]", s, name, v)
		}
		xy[i] = v
	}
	return viewport.Pixel{X: xy[0], Y: xy[1]}, nil
}

// readPixels returns the pixels of --pixel and then those of --pixels.
func readPixels(cmd *cobra.Command, args []string, file string) ([]viewport.Pixel, error) {
	var pxs []viewport.Pixel
	for _, a := range args {
		p, err := parsePixel(a)
		if err != nil {
			return nil, fmt.Errorf("--pixel %v", err)
		}
		pxs = append(pxs, p)
	}
	if file == "" {
		return pxs, nil
	}
	var data []byte
	var err error
	name := file
	if file == "-" {
		data, err = io.ReadAll(cmd.InOrStdin())
		name = "stdin"
	} else {
		data, err = os.ReadFile(file)
	}
	if err != nil {
		return nil, err
	}
	cr := csv.NewReader(bytes.NewReader(data))
	cr.FieldsPerRecord = -1
	cr.Comment = '#'
	cr.TrimLeadingSpace = true
	n := 0
	for first := true; ; first = false {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("%s: malformed CSV: %v", name, err)
		}
		line, _ := cr.FieldPos(0)
		if first && len(rec) == 2 && strings.EqualFold(strings.TrimSpace(rec[0]), "x") && strings.EqualFold(strings.TrimSpace(rec[1]), "y") {
			continue // the header
		}
		if len(rec) != 2 {
			return nil, fmt.Errorf("%s:%d: %d fields: want x,y", name, line, len(rec))
		}
		p, err := parsePixel(rec[0] + "," + rec[1])
		if err != nil {
			return nil, fmt.Errorf("%s:%d: %v", name, line, err)
		}
		pxs = append(pxs, p)
		n++
	}
	if n == 0 {
		return nil, fmt.Errorf("%s: no pixels", name)
	}
	return pxs, nil
}

func printUnproject(w io.Writer, v *viewport.View, pxs []viewport.Pixel, ans *wire.UnprojectAnswer) error {
	printCamera(w, v)
	if row, ok := v.HorizonRowPx(); ok {
		if math.Abs(row) < 0.005 {
			row = 0 // no "-0.00"
		}
		fmt.Fprintf(w, "horizon at row %.2f px: pixels at or above it see no ground\n", row)
	} else {
		fmt.Fprintln(w, "horizon: none (pitch 0, every pixel sees the ground)")
	}
	fmt.Fprintln(w)
	user := v.Camera().User()
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "  #\tx px\ty px\tlat\tlon\tfrom user")
	for i, p := range pxs {
		pt := ans.Points[i]
		if pt == nil {
			fmt.Fprintf(tw, "  %d\t%.2f\t%.2f\t—\t—\tabove the horizon\n", i+1, p.X, p.Y)
			continue
		}
		d := routes.GeodesicDistM(user, orb.Point{pt.Lon, pt.Lat})
		fmt.Fprintf(tw, "  %d\t%.2f\t%.2f\t%.6f\t%.6f\t%s\n", i+1, p.X, p.Y, pt.Lat, pt.Lon, meters(d))
	}
	return tw.Flush()
}
