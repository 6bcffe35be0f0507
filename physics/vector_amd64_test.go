package physics

import (
	"testing"
	"unsafe"
)

// The offsets of vecArgs that vector_amd64.s spells out (A_H … A_BI).
func TestVecArgsLayout(t *testing.T) {
	var a vecArgs
	for _, c := range []struct {
		name      string
		got, want uintptr
	}{
		{"h", unsafe.Offsetof(a.h), 0}, {"gh", unsafe.Offsetof(a.gh), 8},
		{"wxh", unsafe.Offsetof(a.wxh), 16}, {"wyh", unsafe.Offsetof(a.wyh), 24},
		{"p", unsafe.Offsetof(a.p), 32}, {"steps", unsafe.Offsetof(a.steps), 40},
		{"off", unsafe.Offsetof(a.off), 48}, {"pos", unsafe.Offsetof(a.pos), 56},
		{"scale", unsafe.Offsetof(a.scale), 64}, {"scale2", unsafe.Offsetof(a.scale2), 72},
		{"ar", unsafe.Offsetof(a.ar), 80}, {"ai", unsafe.Offsetof(a.ai), 88},
		{"br", unsafe.Offsetof(a.br), 96}, {"bi", unsafe.Offsetof(a.bi), 104},
	} {
		if c.got != c.want {
			t.Errorf("vecArgs.%s at offset %d, want %d (the assembly's A_ constants)", c.name, c.got, c.want)
		}
	}
}
