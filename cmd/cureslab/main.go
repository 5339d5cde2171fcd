package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"strings"
)

func main() { os.Exit(run(os.Args[1:], os.Stdout, os.Stderr)) }

// env is what a command runs with.
type env struct {
	ctx            context.Context
	stdout, stderr io.Writer
	cmd            *Command // the command running
}

// run executes the command line args and returns the exit status.
func run(args []string, stdout, stderr io.Writer) int {
	buildCommands()
	e := &env{ctx: context.Background(), stdout: stdout, stderr: stderr}
	if len(args) == 0 {
		printUsage(stderr)
		return exitUsage
	}
	name := args[0]
	switch name {
	case "-h", "--help", "-help":
		printUsage(stdout)
		return exitOK
	}
	if strings.HasPrefix(name, "-") {
		fmt.Fprintf(stderr, "cureslab: unknown flag %s: a command comes first\nRun 'cureslab help' for usage.\n", name)
		return exitUsage
	}
	cmd := lookup(name)
	if cmd == nil {
		fmt.Fprintf(stderr, "cureslab: unknown command %q%s\nRun 'cureslab help' for usage.\n", name, didYouMean(name, commandNames()))
		return exitUsage
	}
	return cmd.run(e, args[1:])
}
