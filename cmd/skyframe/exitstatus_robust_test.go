package main

import (
	"bytes"
	"context"
	"regexp"
	"strings"
	"testing"
)

// exitStatusLine is the contract every --help states (main.go's package
// doc and the README): the statuses the tests of this package rely on.
const exitStatusLine = "Exit status: 0 success, 1 runtime failure, 2 usage or input error"

// TestHelpStatesExitStatus: the top-level usage and the --help of every
// command and subcommand print the exit statuses, on stdout, with status 0;
// usage printed because of a missing command goes with status 2.
func TestHelpStatesExitStatus(t *testing.T) {
	help := func(args ...string) (int, string, string) {
		var out, errb bytes.Buffer
		code := run(context.Background(), args, &out, &errb)
		return code, out.String(), errb.String()
	}
	invocations := [][]string{{"--help"}, {"-h"}, {"help"}}
	for _, c := range commands() {
		invocations = append(invocations, []string{c.name, "--help"})
	}
	// Subcommands of catalog, as its usage line lists them: "<a|b|c>".
	_, catHelp, _ := help("catalog", "--help")
	m := regexp.MustCompile(`skyframe catalog <([a-z|]+)>`).FindStringSubmatch(catHelp)
	if m == nil {
		t.Fatalf("catalog --help names no subcommands:\n%s", catHelp)
	}
	for _, sub := range strings.Split(m[1], "|") {
		invocations = append(invocations, []string{"catalog", sub, "--help"})
	}
	for _, args := range invocations {
		code, out, errs := help(args...)
		name := strings.Join(args, " ")
		if code != exitOK {
			t.Errorf("%s: status %d, want 0\n%s", name, code, errs)
		}
		if !strings.Contains(out, exitStatusLine) {
			t.Errorf("%s: stdout lacks %q:\n%s", name, exitStatusLine, out)
		}
	}

	code, out, _ := help()
	if code != exitUsage || !strings.Contains(out, exitStatusLine) {
		t.Errorf("no command: status %d (want %d), usage with exit statuses: %v", code, exitUsage, strings.Contains(out, exitStatusLine))
	}
	code, _, errs := help("no-such-command")
	if code != exitUsage || !strings.Contains(errs, `"no-such-command"`) || !strings.Contains(errs, exitStatusLine) {
		t.Errorf("unknown command: status %d (want %d), stderr:\n%s", code, exitUsage, errs)
	}
}
