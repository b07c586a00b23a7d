package isolate

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"os/exec"
	"strings"
)

// crashMessage tells in a plain sentence why a child ended without reporting, from what the
// Go runtime printed on its stderr and how it exited. The runtime's trace is never shown: it
// names the interpreter's internals, not the script. resumable says whether a rerun of the
// same script may get further (a race between workers, a kill, memory) or not (recursion).
func crashMessage(stderr []byte, werr error) (msg string, resumable bool) {
	fatal, panicked, trace := "", "", string(stderr)
	sc := bufio.NewScanner(bytes.NewReader(stderr))
	sc.Buffer(make([]byte, 0, 64<<10), 1<<20)
	for sc.Scan() {
		line := sc.Text()
		switch {
		case fatal == "" && strings.HasPrefix(line, "fatal error: "):
			fatal = strings.TrimPrefix(line, "fatal error: ")
		case strings.Contains(line, "goroutine stack exceeds"):
			fatal = "stack overflow"
		case panicked == "" && strings.HasPrefix(line, "panic: "):
			panicked = strings.TrimPrefix(line, "panic: ")
			if i := strings.Index(panicked, " [recovered"); i > 0 {
				panicked = panicked[:i]
			}
		}
	}
	switch {
	case strings.Contains(fatal, "stack overflow"):
		return "the script exhausted the stack: endless recursion?", false
	case strings.Contains(fatal, "out of memory"):
		return "the script ran out of memory: the machine could not give what it asked for (a frame, a table or a slice too large?)", true
	case strings.HasPrefix(fatal, "concurrent map"):
		return fmt.Sprintf("the script's code used one map from several goroutines at once (%s): a custom block must keep its state inside Link; -workers 1 avoids it", fatal), true
	case strings.Contains(fatal, "all goroutines are asleep"):
		return "the script's goroutines all wait for each other (deadlock)", false
	case fatal != "":
		return "the run crashed: " + fatal, true
	case panicked != "" && strings.Contains(trace, "interp._panic"):
		return "a goroutine of the script panicked: " + panicked + " (a panic outside the experiment's own calls ends the run)", false
	case strings.HasPrefix(panicked, "runtime error: "):
		return "a goroutine of the script failed: " + panicked, false
	case panicked != "" && strings.Contains(trace, "yaegi"):
		return "the interpreter failed on a construct of the script (" + panicked + "); simplify it (generic code is the usual cause), or run the script with go run", false
	case panicked != "":
		return "the run crashed: " + panicked, false
	}
	var ee *exec.ExitError
	if errors.As(werr, &ee) && !ee.Exited() {
		return fmt.Sprintf("the run was ended from outside (%s); by the system, for lack of memory?", ee.String()), true
	}
	if werr != nil {
		return "the run ended without a report (" + werr.Error() + ")", true
	}
	return "the run ended without a report", true
}
