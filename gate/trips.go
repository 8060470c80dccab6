package gate

import (
	"bytes"
	"encoding/json"
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"github.com/viewspec/viewspec/geofile"
	"github.com/viewspec/viewspec/routes"
)

// Trip is one drive to compare the rule sets on: a name, its route with
// speeds, and where it starts. File is the file it was read from (empty
// for a trip made in code).
type Trip struct {
	Name        string
	File        string
	Route       *routes.Route
	StartAlongM float64
}

// label names the trip in messages: its file, or its name.
func (t *Trip) label() string {
	if t.File != "" {
		return t.File
	}
	return t.Name
}

// Skipped is a file of a drives folder that was not read as a drive, and
// why.
type Skipped struct {
	File   string `json:"file"`
	Reason string `json:"reason"`
}

// driveExts are the extensions of the files a folder of drives is read
// for.
var driveExts = []string{".geojson", ".json", ".gpx"}

// ReadTrips reads drive files (SPEC §8): routes with their speed profile,
// a GeoJSON LineString feature with properties.speed_mps or a GPX 1.1 track
// with a time on every point (SPEC §4). A file named in paths must be a
// drive. A folder stands for the drives among its *.geojson, *.json and
// *.gpx files, in name order; its other files of those kinds (markers,
// streets, footprints, a JSON report) are not drives and come back in
// skipped with the reason, and a folder without any drive is an error
// naming it. A file that cannot be read (malformed JSON or XML, a drive
// file whose route is invalid) is an error wherever it was found.
//
// A drive is named by its file's name without the extension (SPEC §8);
// when two files of different folders have the same name, each of them is
// named by its path without the extension. A file given twice (a folder
// and a file in it) is read once, and the second mention is skipped.
func ReadTrips(paths []string) (trips []Trip, skipped []Skipped, err error) {
	var files []string
	seen := map[string]bool{}
	for _, p := range paths {
		st, err := os.Stat(p)
		if err != nil {
			return nil, nil, err
		}
		if !st.IsDir() {
			if seen[filepath.Clean(p)] {
				skipped = append(skipped, Skipped{p, "named twice: read once"})
				continue
			}
			seen[filepath.Clean(p)] = true
			files = append(files, p)
			continue
		}
		in, skip, err := folderDrives(p, seen)
		if err != nil {
			return nil, nil, err
		}
		skipped = append(skipped, skip...)
		files = append(files, in...)
	}
	trips = make([]Trip, 0, len(files))
	for _, f := range files {
		t, err := readTrip(f)
		if err != nil {
			return nil, nil, err
		}
		trips = append(trips, t)
	}
	nameTrips(trips)
	return trips, skipped, nil
}

// folderDrives returns the drive files of folder dir in name order, and
// the files of a drive's extension in it that are not drives, with the
// reason. seen holds the files already taken, and takes these.
func folderDrives(dir string, seen map[string]bool) (drives []string, skipped []Skipped, err error) {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil, nil, err
	}
	candidates := 0
	for _, e := range entries { // os.ReadDir sorts by name
		if e.IsDir() || !slices.Contains(driveExts, strings.ToLower(filepath.Ext(e.Name()))) {
			continue
		}
		candidates++
		f := filepath.Join(dir, e.Name())
		if seen[f] {
			skipped = append(skipped, Skipped{f, "named twice: read once"})
			continue
		}
		data, err := os.ReadFile(f)
		if err != nil {
			return nil, nil, err
		}
		why, err := notADrive(f, data)
		if err != nil {
			return nil, nil, err
		}
		if why != "" {
			skipped = append(skipped, Skipped{f, why})
			continue
		}
		seen[f] = true
		drives = append(drives, f)
	}
	if len(drives) == 0 {
		msg := fmt.Sprintf("%s: no drive file (a GeoJSON LineString feature with properties.speed_mps, or a GPX track with a time on every point)", dir)
		if candidates == 0 {
			return nil, nil, fmt.Errorf("%s; it has no *.geojson, *.json or *.gpx file", msg)
		}
		var why []string
		for _, s := range skipped {
			why = append(why, filepath.Base(s.File)+": "+s.Reason)
		}
		return nil, nil, fmt.Errorf("%s; skipped %s", msg, strings.Join(why, "; "))
	}
	return drives, skipped, nil
}

// readTrip reads one drive file.
func readTrip(f string) (Trip, error) {
	data, err := os.ReadFile(f)
	if err != nil {
		return Trip{}, err
	}
	rf, err := geofile.ReadRoute(f, data)
	if err != nil {
		return Trip{}, err
	}
	if rf.SpeedsMps == nil {
		return Trip{}, fmt.Errorf("%s: a drive needs speeds (properties.speed_mps, or GPX times)", f)
	}
	r, err := routes.New(rf.Points, rf.SpeedsMps)
	if err != nil {
		return Trip{}, fmt.Errorf("%s: %v", f, err)
	}
	return Trip{Name: strings.TrimSuffix(filepath.Base(f), filepath.Ext(f)), File: f, Route: r}, nil
}

// nameTrips gives trips whose names (file names) are alike their paths
// without the extension as names.
func nameTrips(trips []Trip) {
	count := map[string]int{}
	for _, t := range trips {
		count[t.Name]++
	}
	for i, t := range trips {
		if count[t.Name] > 1 {
			trips[i].Name = filepath.ToSlash(strings.TrimSuffix(t.File, filepath.Ext(t.File)))
		}
	}
}

// notADrive says why the file f, holding data, is not a drive, or returns
// "" when it is one. A file that cannot be read as JSON or XML is an error
// (from the route reader, which names its line), not a file to skip.
func notADrive(f string, data []byte) (string, error) {
	trimmed := bytes.TrimSpace(data)
	switch {
	case len(trimmed) == 0:
		return "an empty file", nil
	case trimmed[0] == '<':
		return notADriveGPX(f, data)
	case !json.Valid(trimmed):
		_, err := geofile.ReadRoute(f, data)
		if err == nil { // not expected: the route reader accepted what is not JSON
			err = fmt.Errorf("%s: not JSON", f)
		}
		return "", err
	}
	var g map[string]json.RawMessage
	if json.Unmarshal(trimmed, &g) != nil {
		return "JSON, but not an object, so not GeoJSON", nil
	}
	switch typ := jsonString(g["type"]); typ {
	case "LineString":
		return "a bare LineString geometry: no properties.speed_mps", nil
	case "Feature":
		geom, speeds := featureKind(g)
		switch {
		case geom == "LineString" && speeds:
			return "", nil
		case geom == "LineString":
			return "a LineString feature without properties.speed_mps", nil
		case geom == "":
			return "a feature without geometry", nil
		}
		return "a " + geom + " feature, not a LineString", nil
	case "FeatureCollection":
		var features []map[string]json.RawMessage
		json.Unmarshal(g["features"], &features) // what is not a list of objects counts as no feature
		kinds := map[string]int{}
		for _, f := range features {
			geom, speeds := featureKind(f)
			switch {
			case geom == "LineString" && speeds:
				return "", nil
			case geom == "LineString":
				kinds["LineString without properties.speed_mps"]++
			case geom == "":
				kinds["feature without geometry"]++
			default:
				kinds[geom]++
			}
		}
		if len(features) == 0 {
			return "a FeatureCollection without features", nil
		}
		var parts []string
		for k, n := range kinds {
			parts = append(parts, plural(n, k))
		}
		slices.Sort(parts)
		return "no LineString feature with properties.speed_mps (" + strings.Join(parts, ", ") + ")", nil
	case "":
		return `JSON without a GeoJSON "type"`, nil
	default:
		return "GeoJSON of type " + strconv.Quote(typ) + ", not a route", nil
	}
}

// jsonString is the JSON string raw holds, or "" when it holds none.
func jsonString(raw json.RawMessage) string {
	var s string
	json.Unmarshal(raw, &s)
	return s
}

// featureKind returns the type of a GeoJSON feature's geometry ("" when
// it has none) and whether its properties have a speed_mps.
func featureKind(f map[string]json.RawMessage) (geom string, speeds bool) {
	var g, props map[string]json.RawMessage
	json.Unmarshal(f["geometry"], &g)
	json.Unmarshal(f["properties"], &props)
	_, speeds = props["speed_mps"]
	return jsonString(g["type"]), speeds
}

// plural says "1 Point" or "40 Points"; for a kind of several words, the
// first word takes the s.
func plural(n int, kind string) string {
	if n != 1 {
		word, rest, _ := strings.Cut(kind, " ")
		kind = strings.TrimSpace(word + "s " + rest)
	}
	return strconv.Itoa(n) + " " + kind
}

// notADriveGPX says why a GPX file is not a drive, or returns "" when it
// is one.
func notADriveGPX(f string, data []byte) (string, error) {
	dec := xml.NewDecoder(bytes.NewReader(data))
	points := false
	for !points {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			_, err := geofile.ReadRoute(f, data) // names the line
			return "", err
		}
		if s, ok := tok.(xml.StartElement); ok && (s.Name.Local == "trkpt" || s.Name.Local == "rtept") {
			points = true
		}
	}
	if !points {
		return "a GPX file without track or route points", nil
	}
	rf, err := geofile.ReadRoute(f, data)
	if err != nil {
		return "", err
	}
	if rf.SpeedsMps == nil {
		return "a GPX track without a time on every point, so without speeds", nil
	}
	return "", nil
}

// ReadMarkerNames returns the names a marker file gives its markers, by
// id: properties.name of a GeoJSON FeatureCollection's points, when it is
// a string (ids read as geofile.ReadMarkers reads them: a string, or a
// whole number written in its shortest form). A CSV marker file
// (id,lat,lon[,priority]) has no names: the map is empty. The markers
// themselves are read, and checked, by geofile.ReadMarkers; this reads
// only the names and ignores what it cannot read.
func ReadMarkerNames(data []byte) map[string]string {
	names := map[string]string{}
	trimmed := bytes.TrimSpace(data)
	if len(trimmed) == 0 || trimmed[0] != '{' {
		return names
	}
	var fc struct {
		Features []struct {
			Properties map[string]any `json:"properties"`
		} `json:"features"`
	}
	if json.Unmarshal(trimmed, &fc) != nil {
		return names
	}
	for _, f := range fc.Features {
		name, ok := f.Properties["name"].(string)
		if !ok || name == "" {
			continue
		}
		switch id := f.Properties["id"].(type) {
		case string:
			names[id] = name
		case float64:
			if id == math.Trunc(id) && math.Abs(id) <= 1<<53 {
				names[strconv.FormatFloat(id, 'f', -1, 64)] = name
			}
		}
	}
	return names
}
