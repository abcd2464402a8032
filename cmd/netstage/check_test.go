package main

import (
	"bytes"
	"flag"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// update rewrites golden files instead of comparing with them:
// go test ./cmd/netstage -run Golden -update. Other tests of this package
// share it (a flag can be defined only once).
var update = flag.Bool("update", false, "rewrite the golden files under testdata/")

// goldenDir is the top-level testdata directory, seen from this package.
const goldenDir = "../../testdata"

// wantLines reports each of wants that out lacks.
func wantLines(t *testing.T, out string, wants ...string) {
	t.Helper()
	for _, want := range wants {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

// checkGolden compares got with the golden file, or rewrites it with -update.
func checkGolden(t *testing.T, name string, got []byte) {
	t.Helper()
	path := filepath.Join(goldenDir, name)
	if *update {
		if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run with -update to create it)", err)
	}
	if !bytes.Equal(got, want) {
		t.Errorf("output differs from %s (run with -update if the change is intended)\ngot:\n%s\nwant:\n%s", path, got, want)
	}
}

// runCLI runs one command line and returns its exit code and outputs.
func runCLI(args ...string) (int, string, string) {
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return code, out.String(), errb.String()
}

// TestCheckDemoGolden is a regression guard on the summary of the demo
// (not a proof of anything: the loader's own tests check the numbers).
func TestCheckDemoGolden(t *testing.T) {
	code, out, errOut := runCLI("check", "--demo")
	if code != exitOK {
		t.Fatalf("exit code: got %d, want %d\n%s", code, exitOK, errOut)
	}
	if errOut != "" {
		t.Errorf("stderr: got %q, want nothing", errOut)
	}
	checkGolden(t, "check/demo.golden", []byte(out))
	// Numbers that can be checked by hand against the demo case file: 11
	// sites, 18 links, 20 demands whose first-year Gbps sum to 433.
	for _, want := range []string{"sites        11", "links        18 (1 candidate)", "demands      20", "433.0", "cumulative budget: 220,000 EUR"} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q", want)
		}
	}
}

func TestCheckBadInput(t *testing.T) {
	code, out, errOut := runCLI("check", filepath.Join(goldenDir, "bad", "case.toml"))
	if code != exitBadInput {
		t.Fatalf("exit code: got %d, want %d\n%s", code, exitBadInput, errOut)
	}
	if out != "" {
		t.Errorf("stdout: got %q, want nothing on bad input", out)
	}
	checkGolden(t, "check/bad-case.golden", []byte(errOut))
	// Each mistake of testdata/bad/case.toml, at its line (counted in the file).
	for _, want := range []string{
		"case.toml:8:1: case.discount_rate: value out of range",
		`case.toml:20:1: links.to: unknown reference: site "N3" is not defined`,
		`case.toml:23:1: links.clas: unknown key: "clas" (did you mean "class"?)`,
		"case.toml:30:1: demands.committed: wrong list length: want one value per year of the horizon (3), got 2",
	} {
		if !strings.Contains(errOut, want) {
			t.Errorf("stderr lacks %q:\n%s", want, errOut)
		}
	}
}

func TestCheckSyntaxError(t *testing.T) {
	code, _, errOut := runCLI("check", filepath.Join(goldenDir, "bad", "syntax.toml"))
	if code != exitBadInput {
		t.Fatalf("exit code: got %d, want %d", code, exitBadInput)
	}
	if !strings.Contains(errOut, "syntax.toml:2:") || !strings.Contains(errOut, "^") || !strings.Contains(errOut, `name = "unterminated`) {
		t.Errorf("want file:line, the offending line and a caret, got:\n%s", errOut)
	}
}

func TestCheckUsage(t *testing.T) {
	tests := []struct {
		name string
		args []string
		want string
	}{
		{"nothing to check", []string{"check"}, "name a case file or use --demo"},
		{"both", []string{"check", "x.toml", "--demo"}, "not both"},
		{"missing file", []string{"check", "no-such-case.toml"}, "no such file"},
		{"two files", []string{"check", "a.toml", "b.toml"}, "accepts at most 1 arg"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, _, errOut := runCLI(tc.args...)
			if code != exitBadInput {
				t.Errorf("exit code: got %d, want %d", code, exitBadInput)
			}
			if !strings.Contains(errOut, tc.want) {
				t.Errorf("stderr: got %q, want %q", errOut, tc.want)
			}
		})
	}
}

func TestDemoWritesAndRefusesOverwrite(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "new", "case")
	code, out, errOut := runCLI("demo", dir)
	if code != exitOK {
		t.Fatalf("demo: exit %d: %s", code, errOut)
	}
	for _, f := range []string{"case.toml", "catalogs/brightwave.toml", "catalogs/polaris.toml"} {
		if !strings.Contains(out, filepath.Join(dir, filepath.FromSlash(f))) {
			t.Errorf("output does not list %s:\n%s", f, out)
		}
	}
	// The written case checks clean and says the same as --demo, apart from
	// the file line and the directory in warnings.
	code, fromDisk, errOut := runCLI("check", filepath.Join(dir, "case.toml"))
	if code != exitOK {
		t.Fatalf("check of the written demo: exit %d: %s", code, errOut)
	}
	_, embedded, _ := runCLI("check", "--demo")
	fromDisk = strings.ReplaceAll(fromDisk, dir+string(filepath.Separator), "")
	if dropLine(fromDisk, "file ") != dropLine(embedded, "file ") {
		t.Errorf("written demo differs from the embedded one:\n%s\nvs\n%s", fromDisk, embedded)
	}

	// A second run refuses, and leaves the files alone.
	edited := []byte("# edited by the planner\n")
	if err := os.WriteFile(filepath.Join(dir, "case.toml"), edited, 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, errOut = runCLI("demo", dir)
	if code != exitBadInput || !strings.Contains(errOut, "not overwriting") || !strings.Contains(errOut, "--force") {
		t.Errorf("second demo: got exit %d, %q; want exit 2 naming --force", code, errOut)
	}
	if b, _ := os.ReadFile(filepath.Join(dir, "case.toml")); !bytes.Equal(b, edited) {
		t.Error("refused demo still changed case.toml")
	}
	code, _, errOut = runCLI("demo", dir, "--force")
	if code != exitOK {
		t.Fatalf("demo --force: exit %d: %s", code, errOut)
	}
	if b, _ := os.ReadFile(filepath.Join(dir, "case.toml")); bytes.Equal(b, edited) {
		t.Error("demo --force did not replace case.toml")
	}
	// No temporary files are left behind.
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.Contains(e.Name(), ".tmp") {
			t.Errorf("temporary file left: %s", e.Name())
		}
	}
}

// dropLine removes the line starting with prefix.
func dropLine(s, prefix string) string {
	var keep []string
	for _, l := range strings.Split(s, "\n") {
		if !strings.HasPrefix(l, prefix) {
			keep = append(keep, l)
		}
	}
	return strings.Join(keep, "\n")
}
