package scene

import "fmt"

// InputError reports a bad option value, star reference or input file,
// found before anything is written (the command exits with status 2). Its
// message names the flag (--look, --toward, …) or, for a plan, the plan's
// file and key.
type InputError struct{ Err error }

func (e *InputError) Error() string { return e.Err.Error() }
func (e *InputError) Unwrap() error { return e.Err }

func usagef(format string, a ...any) error {
	return &InputError{fmt.Errorf(format, a...)}
}
