package spec

// CheckLatLon returns nil when latDeg and lonDeg are a usable WGS84
// position (finite, latitude in [-90, 90], longitude in [-180, 180]), or
// the error naming path.lat or path.lon (latitude first) and the
// value. It is the one such check of viewspec.
func CheckLatLon(path string, latDeg, lonDeg float64) error {
	// Each comparison is false for NaN, and ±Inf fails its bound.
	if !(latDeg >= -90 && latDeg <= 90) {
		return Out(Join(path, "lat"), latDeg, "latitude must be finite and within [-90, 90]")
	}
	if !(lonDeg >= -180 && lonDeg <= 180) {
		return Out(Join(path, "lon"), lonDeg, "longitude must be finite and within [-180, 180]")
	}
	return nil
}

// Join returns the path of field name inside the object at path: "lat"
// at the top level (path empty), "camera.lat" inside "camera".
func Join(path, name string) string {
	if path == "" {
		return name
	}
	return path + "." + name
}
