package main

func runCurves(e *env, args []string) error { return usagef("curves: not yet available") }

func runCensus(e *env, args []string) error { return usagef("census: not yet available") }
