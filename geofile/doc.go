// Package geofile reads the files people keep routes and markers in: a
// route from GeoJSON (a LineString feature with properties.speed_mps) or
// GPX 1.1 (speeds from the times), markers from GeoJSON Points or CSV
// (id,lat,lon[,priority]).
//
// Positions are WGS84 [lon, lat] degrees, speeds m/s. A bad file is a
// *FileError naming the file, the line or feature, and the field.
package geofile
