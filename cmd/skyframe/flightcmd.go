package main

func runFlight(e *env, args []string) error {
	return usagef("flight: not yet available")
}

func runStill(e *env, args []string) error {
	return usagef("still: not yet available")
}

func isInputError(err error) bool { return false }
