package main

import "github.com/skyframe/skyframe/sky"

// unresolvedMaps keeps the built maps by depth: a map takes a few tenths
// of a second of CPU to build, and stills, flights and tests come back to
// the same depths.
var unresolvedMaps sky.UnresolvedMaps
