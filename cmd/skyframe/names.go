package main

import "github.com/spf13/pflag"

// namesHelp is the help of --names (and the plan key catalogue.names).
const namesHelp = "IAU Catalog of Star Names file (the WGSN's IAU-CSN table) for proper names in star references and labels; default: the copy `skyframe catalog fetch names` keeps in the user cache, if there is one; none: no names table"

func registerNames(fs *pflag.FlagSet, dst *string) {
	fs.StringVar(dst, "names", "", namesHelp)
}
