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

// The offsets of relaxArgs and relaxStep that vector_amd64.s spells out (R_…, S_…).
func TestRelaxArgsLayout(t *testing.T) {
	var a relaxArgs
	var r relaxStep
	for _, c := range []struct {
		name      string
		got, want uintptr
	}{
		{"rec", unsafe.Offsetof(a.rec), 0}, {"steps", unsafe.Offsetof(a.steps), 8},
		{"fact", unsafe.Offsetof(a.fact), 16}, {"spin", unsafe.Offsetof(a.spin), 24},
		{"m", unsafe.Offsetof(a.m), 184}, {"x", unsafe.Offsetof(a.x), 280},
		{"step.t", unsafe.Offsetof(r.t), 0}, {"step.wxt", unsafe.Offsetof(r.wxt), 8},
		{"step.wyt", unsafe.Offsetof(r.wyt), 16}, {"step.gt", unsafe.Offsetof(r.gt), 24},
		{"step.sub", unsafe.Offsetof(r.sub), 32}, {"step.terms", unsafe.Offsetof(r.terms), 40},
		{"step size", unsafe.Sizeof(r), 48},
	} {
		if c.got != c.want {
			t.Errorf("%s at offset %d, want %d (the assembly's constants)", c.name, c.got, c.want)
		}
	}
}
