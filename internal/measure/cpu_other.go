//go:build !unix

package measure

import "time"

// CPU is not measured on this system: 0.
func CPU() time.Duration { return 0 }
