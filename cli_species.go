package main

import "context"

// cmdSpecies is written by the species-reference work.
func cmdSpecies(ctx context.Context, args []string, cio cmdIO) int {
	return usageErr(cio, "species", "not built yet")
}
