package main

import (
	"io"
	"slices"
	"testing"
)

// Flags may stand before or after the plan file, as users type them; "--"
// ends the flags (the convention of the standard flag package and of
// POSIX utilities).
func TestParseArgs(t *testing.T) {
	cases := []struct {
		args []string
		out  string
		pos  []string
	}{
		{[]string{"plan.toml"}, "", []string{"plan.toml"}},
		{[]string{"-out", "d", "plan.toml"}, "d", []string{"plan.toml"}},
		{[]string{"plan.toml", "-out", "d"}, "d", []string{"plan.toml"}},
		{[]string{"plan.toml", "-quiet", "-out=d"}, "d", []string{"plan.toml"}},
		{[]string{"a.toml", "-out", "d", "b.toml"}, "d", []string{"a.toml", "b.toml"}},
		{[]string{"-out", "d", "--", "-odd-name.toml"}, "d", []string{"-odd-name.toml"}},
		{nil, "", nil},
	}
	for _, c := range cases {
		fs := newFlags("run", io.Discard)
		out := fs.String("out", "", "")
		fs.Bool("quiet", false, "")
		pos, err := parseArgs(fs, c.args)
		if err != nil {
			t.Errorf("%q: %v", c.args, err)
			continue
		}
		if *out != c.out || !slices.Equal(pos, c.pos) {
			t.Errorf("%q: out %q, arguments %q; want %q, %q", c.args, *out, pos, c.out, c.pos)
		}
	}
	fs := newFlags("run", io.Discard)
	if _, err := parseArgs(fs, []string{"plan.toml", "-no-such-flag"}); err == nil {
		t.Error("an unknown flag after the plan was accepted")
	}
}
