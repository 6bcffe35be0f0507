package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"

	"Nutate/dsl"
	"Nutate/kernel"
)

// cmdKernel runs the Jupyter kernel on the sockets of a connection file; this is
// what the kernelspec launches. Relative paths in cells resolve against the
// working directory, which Jupyter sets to the notebook's folder.
func cmdKernel(args []string) int {
	fs := flag.NewFlagSet("kernel", flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	conn := fs.String("connection-file", "", "Jupyter connection file")
	var allow allowFlags
	fs.Var(&allow, "allow-files", "")
	memory := fs.String("memory", "", "session memory budget")
	work := fs.String("work", "", "work budget in isochromat-steps")
	if err := fs.Parse(args); err != nil {
		fmt.Fprintf(os.Stderr, "nutate kernel: %v\nusage: nutate kernel --connection-file FILE [--allow-files DIR]... [--memory SIZE] [--work STEPS]\n", err)
		return 2
	}
	if *conn == "" && fs.NArg() == 1 {
		*conn = fs.Arg(0)
	}
	if *conn == "" || fs.NArg() > 1 {
		fmt.Fprintln(os.Stderr, "nutate kernel: --connection-file: got none, want the path Jupyter passes\nusage: nutate kernel --connection-file FILE [--allow-files DIR]... [--memory SIZE] [--work STEPS]")
		return 2
	}
	budget, err := memoryBudget(*memory)
	if err != nil {
		fmt.Fprintln(os.Stderr, "nutate kernel: --memory:", err)
		return 2
	}
	steps, err := workBudget(*work)
	if err != nil {
		fmt.Fprintln(os.Stderr, "nutate kernel: --work:", err)
		return 2
	}
	dir, err := os.Getwd()
	if err != nil {
		dir = "."
	}
	// Files beyond the notebook's folder: --allow-files in the kernelspec's
	// argv (`nutate install --allow-files DIR`) or NUTATE_ALLOW_FILES.
	allowed, err := allowedFolders(allow)
	if err != nil {
		fmt.Fprintf(os.Stderr, "nutate kernel: %v\n", err)
		return 2
	}
	ex := newExecutor(dir)
	if err := ex.s.AllowFiles(allowed); err != nil {
		fmt.Fprintf(os.Stderr, "nutate kernel: --allow-files: %v\n", err)
		return 2
	}
	ex.s.SetMemoryBudget(budget)
	ex.s.SetWorkBudget(steps)
	if err := kernel.Run(context.Background(), *conn, ex); err != nil {
		fmt.Fprintf(os.Stderr, "nutate kernel: %v\n", err)
		return 1
	}
	return 0
}

// memoryBudget is the session memory budget: the --memory flag's value if
// given, else the environment's (dsl.MemoryBudgetEnv), else the default.
func memoryBudget(flagValue string) (int64, error) {
	if flagValue != "" {
		return dsl.ParseMemory(flagValue)
	}
	return dsl.MemoryBudgetFromEnv(os.Getenv)
}

// workBudget is the work budget: the --work flag's value if given, else the
// environment's (dsl.WorkBudgetEnv), else the engine's default.
func workBudget(flagValue string) (float64, error) {
	if flagValue != "" {
		return dsl.ParseWork(flagValue)
	}
	return dsl.WorkBudgetFromEnv(os.Getenv)
}
