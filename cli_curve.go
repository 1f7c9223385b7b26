package main

import "context"

// cmdCurve is written by the flight-model work.
func cmdCurve(ctx context.Context, args []string, cio cmdIO) int {
	return usageErr(cio, "curve", "not built yet")
}
