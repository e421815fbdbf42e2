//go:build !unix

package server

import "time"

// processCPU is not measured here: benchmarks leave their CPU metric out.
func processCPU() time.Duration { return 0 }
