package line

import (
	"math"
	"math/cmplx"
)

func abs(z complex128) float64 { return cmplx.Abs(z) }

// angleDeg returns |arg z| in degrees.
func angleDeg(z complex128) float64 { return math.Abs(cmplx.Phase(z)) * 180 / math.Pi }
