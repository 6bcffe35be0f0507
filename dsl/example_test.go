package dsl_test

import (
	"context"
	"fmt"
	"os"

	"Nutate/display"
	"Nutate/dsl"
)

// A session runs cells; each statement answers with a display bundle whose
// text/plain is printed here.
func ExampleSession_Exec() {
	s := dsl.NewSession(os.TempDir())
	sink := dsl.Sink{Display: func(b display.Bundle) { fmt.Println(b["text/plain"]) }}
	err := s.Exec(context.Background(), `
nucleus 31P
field 7 T
print 1 kHz in uT, 15 ppm in Hz
pulse hard = rect(duration = 200 us, flip = 90 deg)
`, sink)
	fmt.Println(err)
	// Output:
	// nucleus 31P: γ/2π = 17.2514 MHz/T (IUPAC, Harris et al., Pure Appl. Chem. 73:1795 (2001))
	// field 7 T: 31P Larmor frequency 120.76 MHz
	// 57.9662 µT
	// 1811.4 Hz
	// pulse hard: rect, 200 µs, 1 sample, peak 72.4577 µT (1250 Hz), flip 90 deg, bandwidth 5 kHz (design)
	// <nil>
}

// An error names the line and column and shows the line with a caret.
func ExampleSession_Exec_error() {
	s := dsl.NewSession(os.TempDir())
	err := s.Exec(context.Background(), "pulse p = rect(duration = 3 kHz, flip = 90 deg)", dsl.Sink{})
	for _, line := range err.(interface{ Traceback() []string }).Traceback() {
		fmt.Println(line)
	}
	// Output:
	// line 1:27: duration expects a time, got 3 kHz (a frequency)
	//   pulse p = rect(duration = 3 kHz, flip = 90 deg)
	//                             ^
}

func ExampleIsComplete() {
	for _, cell := range []string{"pulse p = rect(duration = 1 ms,", "print 1 kHz in uT", "print 1)"} {
		status, indent := dsl.IsComplete(cell)
		fmt.Printf("%s %q\n", status, indent)
	}
	// Output:
	// incomplete "    "
	// complete ""
	// invalid ""
}
