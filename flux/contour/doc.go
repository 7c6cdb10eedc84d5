// Package contour finds contour lines and closed regions of a scalar field
// sampled on a longitude-latitude grid that is periodic in longitude, and
// measures spherical polygons (area and centroid, exact for geodesic edges).
//
// Rings are [][2]float64 of (lon, lat) in degrees. A ring is closed
// implicitly (the last vertex is joined to the first; the first vertex is not
// repeated) and every edge is the short great-circle arc between its
// vertices. The region a ring bounds lies on its left: exterior rings run
// counter-clockwise seen from outside the sphere, holes clockwise.
package contour
