package main

import (
	"errors"
	"flag"
	"io"
	"strings"
	"testing"
)

// FuzzFlags: any command line either parses or returns a usage error (exit status 2) or
// flag.ErrHelp; never a panic.
func FuzzFlags(f *testing.F) {
	for _, s := range []string{"", "-stacking ABA", "-stacking ABX", "-params nope", "-o", "-h", "-D 1,2,x", "-grid -5", "-n NaN",
		"-layers 3-1", "-shard 1/0", "-format json", "-U 1,2", "-T -1", "-eps 0 -gates three"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		args := strings.Fields(s)
		_, err := parse(args, io.Discard, func(string) string { return "" })
		var ue usageError
		if err != nil && !errors.As(err, &ue) && !errors.Is(err, flag.ErrHelp) {
			t.Fatalf("%q: error %v is not a usage error", s, err)
		}
	})
}
