package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"netstage/plans"
)

func TestDemoSynthetic(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "syn")
	var out, errOut bytes.Buffer
	code := run([]string{"demo", "--sites", "8", "--years", "3", "--seed", "5", dir}, &out, &errOut)
	if code != exitOK {
		t.Fatalf("exit %d, stderr %s", code, errOut.String())
	}
	// The files are exactly what plans.Synthetic gives for these arguments,
	// and the loader accepts them.
	want, err := plans.Synthetic(8, 3, 5)
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range want {
		got, err := os.ReadFile(filepath.Join(dir, f.Name))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, f.Data) {
			t.Errorf("%s differs from plans.Synthetic's", f.Name)
		}
	}
	c, _, err := plans.Load(filepath.Join(dir, "case.toml"))
	if err != nil {
		t.Fatalf("written case does not load: %v", err)
	}
	if len(c.Sites) != 8 || c.Horizon != 3 {
		t.Errorf("%d sites, %d years; want 8, 3", len(c.Sites), c.Horizon)
	}

	// A second run refuses to overwrite (bad input), --force replaces.
	out.Reset()
	errOut.Reset()
	if code := run([]string{"demo", "--sites", "8", "--years", "3", dir}, &out, &errOut); code != exitBadInput {
		t.Errorf("overwrite without --force: exit %d, want %d", code, exitBadInput)
	}
	if code := run([]string{"demo", "--sites", "8", "--years", "3", "--force", dir}, &out, &errOut); code != exitOK {
		t.Errorf("overwrite with --force: exit %d, stderr %s", code, errOut.String())
	}
}

func TestDemoSyntheticBadFlags(t *testing.T) {
	tests := []struct {
		name string
		args []string
		msg  string
	}{
		{"years without sites", []string{"demo", "--years", "4"}, "need --sites"},
		{"too few sites", []string{"demo", "--sites", "2"}, "sites"},
		{"no years", []string{"demo", "--sites", "5", "--years", "0"}, "years"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var out, errOut bytes.Buffer
			args := append(tc.args, t.TempDir())
			if code := run(args, &out, &errOut); code != exitBadInput {
				t.Errorf("exit %d, want %d (stderr %s)", code, exitBadInput, errOut.String())
			}
			if !strings.Contains(errOut.String(), tc.msg) {
				t.Errorf("stderr %q lacks %q", errOut.String(), tc.msg)
			}
		})
	}
}
