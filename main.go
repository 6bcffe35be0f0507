// Command nutate is a Jupyter kernel and headless runner for the Nutate RF-pulse
// language: design, simulate and justify MR pulses.
package main

import (
	"fmt"
	"os"
	"strings"

	"Nutate/dsl"
)

// version is the program version, stamped into notebook metadata.
const version = "0.1.0"

func main() {
	os.Exit(realMain(os.Args[1:]))
}

func realMain(args []string) int {
	if len(args) == 0 {
		fmt.Fprintln(os.Stderr, usage)
		return 2
	}
	switch args[0] {
	case "version", "--version":
		fmt.Println("nutate", version)
		return 0
	case "kernel":
		return cmdKernel(args[1:])
	case "install":
		return cmdInstall(args[1:])
	case "run":
		return cmdRun(args[1:])
	case "-h", "--help":
		fmt.Println(usage)
		return 0
	case "help":
		return cmdHelp(args[1:])
	}
	fmt.Fprintf(os.Stderr, "nutate: unknown command %q\n%s\n", args[0], usage)
	return 2
}

const usage = `usage: nutate COMMAND [ARGS]

commands:
  kernel --connection-file F [--allow-files DIR] [--memory SIZE] [--work STEPS]
                               run as a Jupyter kernel (what the kernelspec launches)
  install [--user | --prefix DIR | --sys-prefix] [--allow-files DIR] [--uninstall]
                               install the kernelspec "nutate"
  run [--output F] [--json] [--check] [--set NAME=VALUE] [--allow-files DIR]
      [--memory SIZE] [--work STEPS] FILE...
                               execute notebooks (.ipynb) or scripts headless
                               (--memory, --work: the session's budgets; see the README's Limits)
  run --gather NOTEBOOK...     print every sweep value of notebooks already run as CSV

Files: cells read and write only inside the notebook's folder; --allow-files DIR
(repeatable; or NUTATE_ALLOW_FILES, a list like PATH) allows another folder.
  help [TOPIC]                 the language reference (statements, shapes, arguments,
                               quantities, units, conventions)
  version                      print the version`

// cmdHelp prints the language reference, from the same texts as the kernel's
// inspection.
func cmdHelp(args []string) int {
	text, err := dsl.Help(strings.Join(args, " "))
	if err != nil {
		fmt.Fprintln(os.Stderr, "nutate help:", err)
		return 1
	}
	fmt.Println(strings.TrimRight(text, "\n"))
	return 0
}
