// Package props holds the rapid generators of viewspec's inputs (cameras,
// devices, and later routes, markers and rule sets), biased toward the edges
// where implementations part ways: poles, the antimeridian, zero and high
// pitch, tiny and huge screens, big insets, off-centre anchors.
//
// Units and conventions are those of the packages the values feed: degrees
// for angles, pixels for screens, [lon, lat] degrees for points.
package props
