package job

import "fmt"

// InputError reports a problem with the plan, its catalogue, the output
// directory or the job's settings, found before anything is written (the
// command exits with status 2).
type InputError struct{ Err error }

func (e *InputError) Error() string { return e.Err.Error() }
func (e *InputError) Unwrap() error { return e.Err }

func inputf(format string, a ...any) error {
	return &InputError{fmt.Errorf(format, a...)}
}
