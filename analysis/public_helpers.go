package analysis

import "github.com/go-gl/mathgl/mgl64"

// ResamplePolyline places points every ds mm along a polyline from its start; the last point
// is the polyline's end.
func ResamplePolyline(pts []mgl64.Vec3, ds float64) []mgl64.Vec3 { return resample(pts, ds) }

// SmoothPolyline smooths an evenly sampled polyline with a Gaussian of sigma samples; the ends
// are held.
func SmoothPolyline(pts []mgl64.Vec3, sigma float64) []mgl64.Vec3 { return smoothGaussian(pts, sigma) }

// ArcLengths is the arc length at each point of a polyline from its start.
func ArcLengths(pts []mgl64.Vec3) []float64 { return arcLengths(pts) }

// ParallelFor runs fn(0..n-1) in contiguous chunks on the available cores; each index is
// handled once, so results do not depend on the number of cores.
func ParallelFor(n int, fn func(i int)) { parallelFor(n, fn) }
