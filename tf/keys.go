package tf

import (
	"maps"
	"slices"
)

func sortedKeys(m map[string]float64) []string { return slices.Sorted(maps.Keys(m)) }
