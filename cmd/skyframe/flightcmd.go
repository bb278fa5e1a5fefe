package main

func runFlight(e *env, args []string) error {
	return usagef("flight: not yet available")
}
