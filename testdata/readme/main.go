// Command readme runs the commands the README prints and compares their
// output with the lines the README shows under them. check_readme.sh runs
// it in a clean copy of the repository:
//
//	go run ./testdata/readme README.md
//
// A README command is a line of a fenced block that starts with "$ ",
// continued by the lines after it while a line ends in a backslash. The
// lines after a command, up to the next command or the end of the block,
// are the output it shows. All commands run in order in one bash shell
// (so an export carries over), from the current folder.
//
// The shown lines must appear in the output in the same order, within
// stdout and within stderr (the README shows them together, and the two
// streams may interleave either way); other lines may come between them.
// A line "done ..." may come anywhere: apply's parallel workers finish in
// any order. A line "..." shows that output was left out; a line
// ending in "..." matches any line that begins with what precedes it.
// Runs of blanks compare equal, and a time taken, a number followed by
// " s)", matches any number: it varies from run to run. Every other
// number must match as printed.
package main

import (
	"bufio"
	"bytes"
	"fmt"
	"os"
	"os/exec"
	"regexp"
	"strings"
)

type step struct {
	line int    // README line of the command
	cmd  string // as bash will run it
	want []string
}

func main() {
	if len(os.Args) != 2 {
		fmt.Fprintln(os.Stderr, "usage: readme README.md")
		os.Exit(2)
	}
	data, err := os.ReadFile(os.Args[1])
	if err != nil {
		fmt.Fprintln(os.Stderr, "readme:", err)
		os.Exit(2)
	}
	steps := parse(string(data))
	if len(steps) == 0 {
		fmt.Fprintln(os.Stderr, "readme: no \"$ \" commands found")
		os.Exit(1)
	}
	outs, errs, err := runAll(steps)
	if err != nil {
		fmt.Fprintln(os.Stderr, "readme:", err)
		os.Exit(1)
	}
	failed := 0
	for i, s := range steps {
		if msg := compare(s.want, outs[i], errs[i]); msg != "" {
			failed++
			fmt.Printf("FAIL  README line %d: %s\n      %s\n      stdout was:\n%s      stderr was:\n%s\n", s.line, s.cmd, msg, indent(outs[i]), indent(errs[i]))
			continue
		}
		fmt.Printf("ok    README line %d: %s\n", s.line, firstLine(s.cmd))
	}
	fmt.Printf("readme: %d commands, %d passed, %d failed\n", len(steps), len(steps)-failed, failed)
	if failed > 0 {
		os.Exit(1)
	}
}

// parse extracts the commands and their shown output from the fenced
// blocks of a README.
func parse(text string) []step {
	var steps []step
	lines := strings.Split(text, "\n")
	inBlock := false
	var cur *step
	for i := 0; i < len(lines); i++ {
		l := lines[i]
		if strings.HasPrefix(l, "```") {
			inBlock = !inBlock
			cur = nil
			continue
		}
		if !inBlock {
			continue
		}
		if strings.HasPrefix(l, "$ ") {
			s := step{line: i + 1}
			cmd := strings.TrimPrefix(l, "$ ")
			for strings.HasSuffix(cmd, "\\") && i+1 < len(lines) {
				i++
				cmd = strings.TrimSuffix(cmd, "\\") + " " + strings.TrimSpace(lines[i])
			}
			s.cmd = cmd
			steps = append(steps, s)
			cur = &steps[len(steps)-1]
			continue
		}
		if cur != nil {
			cur.want = append(cur.want, l)
		}
	}
	return steps
}

const marker = "@@readme-step-end@@"

// runAll runs every command in one bash and splits its stdout and
// stderr by step.
func runAll(steps []step) (stdout, stderr []string, err error) {
	var script strings.Builder
	for _, s := range steps {
		fmt.Fprintf(&script, "%s\necho %s; echo %s >&2\n", s.cmd, marker, marker)
	}
	cmd := exec.Command("bash", "--noprofile", "--norc")
	cmd.Stdin = strings.NewReader(script.String())
	var out, errb bytes.Buffer
	cmd.Stdout = &out
	cmd.Stderr = &errb
	if err := cmd.Run(); err != nil {
		return nil, nil, fmt.Errorf("bash: %v\n%s%s", err, out.String(), errb.String())
	}
	stdout = strings.Split(out.String(), marker+"\n")
	stderr = strings.Split(errb.String(), marker+"\n")
	if len(stdout) != len(steps)+1 || len(stderr) != len(steps)+1 {
		return nil, nil, fmt.Errorf("%d of %d commands finished; output:\n%s%s", len(stdout)-1, len(steps), out.String(), errb.String())
	}
	return stdout[:len(steps)], stderr[:len(steps)], nil
}

var (
	blanks  = regexp.MustCompile(`\s+`)
	seconds = regexp.MustCompile(`[0-9]+(\.[0-9]+)?( s\))`)
)

func norm(l string) string {
	l = strings.TrimSpace(blanks.ReplaceAllString(l, " "))
	return seconds.ReplaceAllString(l, "#$2")
}

// compare checks that the wanted lines appear in order in the two
// streams; it returns "" or what did not.
func compare(want []string, stdout, stderr string) string {
	streams := [2][]string{lines(stdout), lines(stderr)}
	var next [2]int
	for _, w := range want {
		w = norm(w)
		if w == "" || w == "..." {
			continue
		}
		prefix := strings.HasSuffix(w, "...")
		w = strings.TrimSpace(strings.TrimSuffix(w, "..."))
		match := func(h string) bool { return h == w || prefix && strings.HasPrefix(h, w) }
		anywhere := strings.HasPrefix(w, "done ")
		found := false
		for k, have := range streams {
			from := next[k]
			if anywhere {
				from = 0
			}
			for j := from; j < len(have); j++ {
				if match(have[j]) {
					found = true
					if !anywhere {
						next[k] = j + 1
					}
					break
				}
			}
			if found {
				break
			}
		}
		if !found {
			return fmt.Sprintf("the README shows %q, which is not in the output (in this order)", w)
		}
	}
	return ""
}

func lines(s string) []string {
	var have []string
	sc := bufio.NewScanner(strings.NewReader(s))
	sc.Buffer(make([]byte, 1<<20), 1<<20)
	for sc.Scan() {
		have = append(have, norm(sc.Text()))
	}
	return have
}

func indent(s string) string {
	var b strings.Builder
	for _, l := range strings.Split(strings.TrimRight(s, "\n"), "\n") {
		b.WriteString("        | " + l + "\n")
	}
	return b.String()
}

func firstLine(s string) string {
	if len(s) > 100 {
		return s[:97] + "..."
	}
	return s
}
