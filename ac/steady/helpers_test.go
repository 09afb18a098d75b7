package steady

import "qpoint/ac/internal/fixture"

var (
	network = fixture.Network
	demo    = fixture.Demo
)
