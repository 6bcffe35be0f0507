package dsl

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"sync"
	"time"

	"Nutate/display"
	"Nutate/dsl/present"
	"Nutate/physics"
	"Nutate/physics/shape"
)

// The session memory budget bounds what a session holds from statement to
// statement (the samples of its pulses, the last sweep's table) and what a sweep
// needs while it runs. It is set by whoever starts Nutate (`nutate run
// --memory`, `nutate kernel --memory`, or the environment variable named by
// MemoryBudgetEnv), never by a notebook.
const (
	// DefaultMemoryBudget is the budget of a new session: 2 GiB.
	DefaultMemoryBudget int64 = 2 << 30
	// MemoryBudgetEnv names the environment variable that sets the budget
	// where no --memory flag is given (e.g. NUTATE_MEMORY=4GiB).
	MemoryBudgetEnv = "NUTATE_MEMORY"
	// minMemoryBudget keeps a budget typed in the wrong unit from refusing
	// everything.
	minMemoryBudget int64 = 64 << 20
)

// KeepOutputs tells the session that its host keeps every output (a notebook
// run headless holds them until it writes the notebook): their bytes then
// count against the memory budget too.
func (s *Session) KeepOutputs() { s.keep = true }

// outputBytes estimates the bytes of outputs as they are kept.
func outputBytes(out []display.Bundle) int64 {
	var n int64
	for _, b := range out {
		for mime, v := range b {
			n += int64(len(mime))
			switch x := v.(type) {
			case string:
				n += int64(len(x))
			case []byte:
				n += int64(len(x))
			default:
				j, _ := json.Marshal(x)
				n += int64(len(j))
			}
		}
	}
	return n
}

// SetMemoryBudget sets the session's memory budget in bytes.
func (s *Session) SetMemoryBudget(bytes int64) { s.budget = bytes }

// MemoryBudget returns the session's memory budget in bytes.
func (s *Session) MemoryBudget() int64 { return s.budget }

// ParseMemory reads a memory size: a number with B, KiB, MiB, GiB or TiB (KB,
// MB, GB, TB and K, M, G, T are read as the same binary units), at least 64 MiB.
func ParseMemory(text string) (int64, error) {
	t := strings.TrimSpace(text)
	i := strings.IndexFunc(t, func(r rune) bool { return !(r >= '0' && r <= '9' || r == '.') })
	if i < 0 {
		i = len(t)
	}
	num, unit := t[:i], strings.ToLower(strings.TrimSpace(t[i:]))
	x, err := strconv.ParseFloat(num, 64)
	shift := map[string]uint{"": 0, "b": 0, "k": 10, "kb": 10, "kib": 10, "m": 20, "mb": 20, "mib": 20, "g": 30, "gb": 30, "gib": 30, "t": 40, "tb": 40, "tib": 40}
	sh, ok := shift[unit]
	if err != nil || !ok || math.IsInf(x, 0) || math.IsNaN(x) {
		return 0, fmt.Errorf("memory: got %q, want a size such as 2GiB or 512MiB", text)
	}
	b := x * float64(uint64(1)<<sh)
	if b < float64(minMemoryBudget) || b > 1<<60 {
		return 0, fmt.Errorf("memory: got %q, want from 64MiB to 1EiB", text)
	}
	return int64(b), nil
}

// MemoryBudgetFromEnv returns the budget named by the environment variable
// MemoryBudgetEnv (value as given by getenv), or DefaultMemoryBudget when unset.
func MemoryBudgetFromEnv(getenv func(string) string) (int64, error) {
	v := getenv(MemoryBudgetEnv)
	if v == "" {
		return DefaultMemoryBudget, nil
	}
	n, err := ParseMemory(v)
	if err != nil {
		return 0, fmt.Errorf("%s: %v", MemoryBudgetEnv, err)
	}
	return n, nil
}

// formatMemory writes a size for messages: "2 GiB", "24.4 MiB", "512 KiB".
func formatMemory(n int64) string {
	units := []string{"B", "KiB", "MiB", "GiB", "TiB"}
	x, u := float64(n), 0
	for x >= 1024 && u < len(units)-1 {
		x /= 1024
		u++
	}
	return present.Number(present.RoundSig(x, 3)) + " " + units[u]
}

// memoryUse counts the bytes a state holds, each shared array once.
type memoryUse struct {
	seen   map[any]bool
	bytes  int64
	pulses int
}

func (m *memoryUse) add(p any, n int64) {
	if n == 0 || m.seen[p] {
		return
	}
	m.seen[p] = true
	m.bytes += n
}

func (m *memoryUse) pulse(p *shape.Pulse) {
	if p == nil {
		return
	}
	w := &p.Wave
	if len(w.B1) > 0 {
		m.add(&w.B1[0], 16*int64(len(w.B1)))
	}
	if len(w.Dwell) > 0 {
		m.add(&w.Dwell[0], 8*int64(len(w.Dwell)))
	}
	if len(w.Gradient) > 0 {
		m.add(&w.Gradient[0], 8*int64(len(w.Gradient)))
	}
	if len(p.Freq) > 0 {
		m.add(&p.Freq[0], 8*int64(len(p.Freq)))
	}
}

func (m *memoryUse) def(d *pulseDef) {
	if d == nil || m.seen[d] {
		return
	}
	m.seen[d] = true
	m.pulses++
	m.pulse(d.Pulse)
	for _, e := range d.Elems {
		m.def(e.Def)
	}
}

// stateMemory counts what st holds: its pulses' samples (arrays shared between
// pulses once) and the last sweep's table.
func stateMemory(st *state) memoryUse {
	m := memoryUse{seen: map[any]bool{}}
	for _, b := range st.names {
		m.def(b.pulse)
	}
	if t := st.last; t != nil {
		m.bytes += t.memory()
	}
	return m
}

// budgetError is the error of a statement that would take the session past
// its memory budget.
func (s *Session) budgetError(what string, need, held int64, pulses int) error {
	holds := formatMemory(held)
	var parts []string
	switch {
	case pulses == 1:
		parts = append(parts, "1 pulse")
	case pulses > 1:
		parts = append(parts, fmt.Sprintf("%d pulses", pulses))
	}
	free := "free some with `reset` or by redefining names"
	if s.outputs > 0 {
		parts = append(parts, formatMemory(s.outputs)+" of outputs kept")
		free += " (outputs stay until the notebook is written: split a long notebook)"
	}
	if len(parts) > 0 {
		holds += " (" + strings.Join(parts, ", ") + ")"
	}
	return fmt.Errorf("session memory budget of %s reached: %s needs %s and the session holds %s; "+
		"%s, or start Nutate with a larger budget (`nutate run --memory 4GiB`, `nutate kernel --memory 4GiB`, or %s=4GiB)",
		formatMemory(s.budget), what, formatMemory(need), holds, free, MemoryBudgetEnv)
}

// checkMemory refuses a statement whose new state (with its outputs, when
// they are kept) would pass the budget while holding more than the committed
// one. On success it counts the outputs kept. The state is counted again only
// after statements that make pulses or tables (or reset); other statements add
// at most outputs, so a cell of many short lines stays linear.
func (s *Session) checkMemory(stmt Stmt, next *state, out []display.Bundle) error {
	var outs int64
	if s.keep {
		outs = outputBytes(out)
	}
	before := s.held
	before.bytes += s.outputs
	after := s.held
	switch stmt.(type) {
	case *PulseStmt, *ImportStmt, *SweepStmt, *ResetStmt:
		after = stateMemory(next)
	}
	after.seen = nil
	held := after
	after.bytes += s.outputs + outs
	if s.budget <= 0 || after.bytes <= s.budget || after.bytes <= before.bytes {
		s.outputs += outs
		s.held = held
		return nil
	}
	what := "this statement"
	switch x := stmt.(type) {
	case *PulseStmt:
		what = "pulse " + x.Name.Name
	case *ImportStmt:
		what = "imported pulse " + x.Name.Name
	case *SweepStmt:
		what = "the sweep's table and outputs"
	case *DescribeStmt, *ReportStmt:
		what = "the outputs of this statement"
	}
	return s.budgetError(what, after.bytes-before.bytes, before.bytes, before.pulses)
}

// needMemory refuses work that needs bytes beyond what the committed state
// leaves of the budget (a sweep's arrays while it runs).
func (ev *evaluator) needMemory(what string, bytes int64) error {
	s := ev.sess
	if s.budget <= 0 {
		return nil
	}
	held := stateMemory(ev.st)
	held.bytes += s.outputs
	if held.bytes+bytes <= s.budget {
		return nil
	}
	return s.budgetError(what, bytes, held.bytes, held.pulses)
}

// shareSamples makes p use src's arrays where they hold the same numbers, so a
// copy that changes nothing, or only what does not touch the samples' timing,
// holds no second copy of them. Arrays of a built pulse are never written
// again, so sharing them is safe.
func shareSamples(p, src *shape.Pulse) {
	if p == nil || src == nil {
		return
	}
	if slices.Equal(p.Wave.B1, src.Wave.B1) {
		p.Wave.B1 = src.Wave.B1
	}
	if slices.Equal(p.Wave.Dwell, src.Wave.Dwell) {
		p.Wave.Dwell = src.Wave.Dwell
	}
	if p.Wave.Gradient != nil && slices.Equal(p.Wave.Gradient, src.Wave.Gradient) {
		p.Wave.Gradient = src.Wave.Gradient
	}
	if p.Freq != nil && slices.Equal(p.Freq, src.Freq) {
		p.Freq = src.Freq
	}
}

// The work budget bounds the isochromat-steps (spins × samples simulated) of
// one statement: a sweep, or the measurements of describe and report. Its
// default is the engine's (physics.DefaultMaxSteps); whoever starts Nutate may
// change it (`--work`, or the environment variable named by WorkBudgetEnv).
const WorkBudgetEnv = "NUTATE_WORK"

// SetWorkBudget sets the session's work budget in isochromat-steps.
func (s *Session) SetWorkBudget(steps float64) { s.work = steps }

// WorkBudget returns the session's work budget in isochromat-steps.
func (s *Session) WorkBudget() float64 { return s.work }

// ParseWork reads a work budget: a number of isochromat-steps from 1e6 to
// 1e15 (e.g. 1e11).
func ParseWork(text string) (float64, error) {
	x, err := strconv.ParseFloat(strings.TrimSpace(text), 64)
	if err != nil || !(x >= 1e6 && x <= 1e15) {
		return 0, fmt.Errorf("work: got %q, want a number of isochromat-steps from 1e6 to 1e15, such as 1e11", text)
	}
	return x, nil
}

// WorkBudgetFromEnv returns the budget named by WorkBudgetEnv, or
// physics.DefaultMaxSteps when unset.
func WorkBudgetFromEnv(getenv func(string) string) (float64, error) {
	v := getenv(WorkBudgetEnv)
	if v == "" {
		return physics.DefaultMaxSteps, nil
	}
	x, err := ParseWork(v)
	if err != nil {
		return 0, fmt.Errorf("%s: %v", WorkBudgetEnv, err)
	}
	return x, nil
}

// workBudget is the session's budget, the engine's default when unset.
func (ev *evaluator) workBudget() float64 {
	if ev.sess == nil || ev.sess.work <= 0 {
		return physics.DefaultMaxSteps
	}
	return ev.sess.work
}

// checkWork refuses work of steps isochromat-steps over the work budget,
// saying how long it would take here and how to raise the budget.
func (ev *evaluator) checkWork(what string, steps float64) error {
	if steps <= ev.workBudget() {
		return nil
	}
	return fmt.Errorf("%s needs %.3g isochromat-steps (%s here), over the session's work budget of %.3g; use fewer points or samples, or start Nutate with a larger budget (`nutate run --work 1e11`, `nutate kernel --work 1e11`, or %s=1e11)",
		what, steps, durationText(steps/engineRate()), ev.workBudget(), WorkBudgetEnv)
}

// workLabel is a progress label with the time the work will take here, when
// that is long enough to be worth saying (5 s or more).
func workLabel(task string, steps float64) string {
	if steps < 1e8 {
		return task // under 5 s even at a slow 2e7 steps/s: no need to time the engine
	}
	if t := steps / engineRate(); t >= 5 {
		return task + " (" + durationText(t) + ")"
	}
	return task
}

// durationText says roughly how long t seconds is: "about 40 s", "about 3 min".
func durationText(t float64) string {
	switch {
	case t < 90:
		return fmt.Sprintf("about %.0f s", math.Max(1, t))
	case t < 90*60:
		return fmt.Sprintf("about %.0f min", t/60)
	default:
		return fmt.Sprintf("about %.1f h", t/3600)
	}
}

var (
	rateOnce sync.Once
	rate     float64
)

// engineRate is the engine's speed on this machine in isochromat-steps per
// second, timed once on a small simulation (a million steps) over all cores,
// as sweeps and measurements run. Estimates made with it are rough: other
// work on the machine changes it.
func engineRate() float64 {
	rateOnce.Do(func() {
		const spins, samples = 256, 4096
		w := physics.Waveform{Dwell: make([]float64, samples), B1: make([]complex128, samples)}
		for j := range w.Dwell {
			w.Dwell[j], w.B1[j] = 1e-6, 1e-6
		}
		iso := &physics.Isochromats{Offset: make([]float64, spins)}
		for i := range iso.Offset {
			iso.Offset[i] = float64(i)
		}
		t0 := time.Now()
		_, err := physics.Simulate(context.Background(), &w, 2.675e8, iso, physics.Options{})
		el := time.Since(t0).Seconds()
		rate = 2e7 // a cautious figure if the timing fails
		if err == nil && el > 0 {
			rate = spins * samples / el
		}
	})
	return rate
}
