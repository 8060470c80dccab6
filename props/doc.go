// Package props holds the rapid generators of viewspec's inputs, biased
// toward the edges where implementations part ways: cameras and devices
// (poles, the antimeridian, zero and high pitch, tiny and huge screens, big
// insets, off-centre anchors), routes of named shape families (zigzags,
// loops, u-turns, repeated vertices, the antimeridian), rule sets, and
// whole wire requests of every op labelled with their edge family
// (ProbeRequest), which the prober draws from.
//
// Units and conventions are those of the packages the values feed: degrees
// for angles, pixels for screens, [lon, lat] degrees for points, m/s.
package props
