package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// readmeStep is one thing the README asks the reader to do: write a file
// (a yaml block whose first line is "# file: NAME") or run a command (a line
// of an sh block that starts with "cmbflux ").
type readmeStep struct {
	line    int
	file    string // file to write, or ""
	content string
	args    []string
}

func readmeSteps(t *testing.T, text string) []readmeStep {
	var steps []readmeStep
	lines := strings.Split(text, "\n")
	for i := 0; i < len(lines); i++ {
		fence := strings.TrimSpace(lines[i])
		if fence != "```sh" && fence != "```yaml" {
			continue
		}
		start := i + 1
		j := start
		for j < len(lines) && strings.TrimSpace(lines[j]) != "```" {
			j++
		}
		block := lines[start:j]
		i = j
		if fence == "```yaml" {
			if len(block) > 0 && strings.HasPrefix(block[0], "# file: ") {
				steps = append(steps, readmeStep{line: start + 1, file: strings.TrimPrefix(block[0], "# file: "), content: strings.Join(block[1:], "\n") + "\n"})
			}
			continue
		}
		for k := 0; k < len(block); k++ {
			cmd, n := block[k], start+k+1
			for strings.HasSuffix(cmd, "\\") && k+1 < len(block) {
				k++
				cmd = strings.TrimSuffix(cmd, "\\") + " " + strings.TrimSpace(block[k])
			}
			if !strings.HasPrefix(cmd, "cmbflux ") {
				continue
			}
			args, err := shellWords(cmd)
			if err != nil {
				t.Fatalf("README.md:%d: %v", n, err)
			}
			steps = append(steps, readmeStep{line: n, args: args[1:]})
		}
	}
	return steps
}

// shellWords splits a command line as sh would for the simple lines of the
// README: words separated by blanks, single and double quotes, and a # that
// starts a comment at the beginning of a word.
func shellWords(s string) ([]string, error) {
	var words []string
	var cur strings.Builder
	inWord := false
	var quote rune
	for _, r := range s {
		switch {
		case quote != 0:
			if r == quote {
				quote = 0
			} else {
				cur.WriteRune(r)
			}
		case r == '\'' || r == '"':
			quote, inWord = r, true
		case r == ' ' || r == '\t':
			if inWord {
				words = append(words, cur.String())
				cur.Reset()
				inWord = false
			}
		case r == '#' && !inWord:
			return words, nil
		default:
			cur.WriteRune(r)
			inWord = true
		}
	}
	if quote != 0 {
		return nil, errUnclosedQuote
	}
	if inWord {
		words = append(words, cur.String())
	}
	return words, nil
}

var errUnclosedQuote = os.ErrInvalid

func TestReadmeExamples(t *testing.T) {
	data, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	steps := readmeSteps(t, string(data))
	ran := 0
	t.Chdir(t.TempDir())
	for _, st := range steps {
		if st.file != "" {
			writeFile(t, st.file, st.content)
			continue
		}
		ran++
		_, errs, code := cli(st.args, "")
		if code != 0 {
			t.Fatalf("README.md:%d: cmbflux %s: exit status %d\n%s", st.line, strings.Join(st.args, " "), code, errs)
		}
	}
	if ran < 10 {
		t.Errorf("only %d README commands found; the parser or the README lost some", ran)
	}
	// The quick start's demo really produced its report.
	if _, err := os.Stat(filepath.Join("demo-out", "report.html")); err != nil {
		t.Errorf("the README's demo wrote no report: %v", err)
	}
}

func TestShellWords(t *testing.T) {
	got, err := shellWords(`cmbflux build --title 'a b' "c d" # comment`)
	if err != nil || strings.Join(got, "|") != "cmbflux|build|--title|a b|c d" {
		t.Errorf("shellWords = %q, %v", got, err)
	}
}

// TestPackageDocSession runs the command lines of the package comment.
func TestPackageDocSession(t *testing.T) {
	src, err := os.ReadFile("main.go")
	if err != nil {
		t.Fatal(err)
	}
	var cmds [][]string
	for _, line := range strings.Split(string(src), "\n") {
		if line == "package main" {
			break
		}
		if c, ok := strings.CutPrefix(line, "//\tcmbflux "); ok {
			w, err := shellWords(c)
			if err != nil {
				t.Fatal(err)
			}
			cmds = append(cmds, w)
		}
	}
	if len(cmds) < 5 {
		t.Fatalf("found %d command lines in the package comment", len(cmds))
	}
	t.Chdir(t.TempDir())
	for _, args := range cmds {
		if _, errs, code := cli(args, ""); code != 0 {
			t.Fatalf("cmbflux %s: exit %d\n%s", strings.Join(args, " "), code, errs)
		}
	}
}
