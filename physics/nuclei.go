package physics

import (
	"math"
	"sort"
	"strings"
)

// Nucleus is a magnetic nucleus with its signed gyromagnetic ratio.
type Nucleus struct {
	Name      string  // as written in the trade: "1H", "31P"
	GammaBar  float64 // γ/2π in Hz/T (signed)
	Reference string  // where the value comes from
}

// Gamma returns γ in rad·s⁻¹·T⁻¹.
func (n Nucleus) Gamma() float64 { return 2 * math.Pi * n.GammaBar }

const (
	codata2018 = "CODATA 2018"
	iupac2001  = "IUPAC, Harris et al., Pure Appl. Chem. 73:1795 (2001)"
)

// nuclei pins the table the code uses: the proton from CODATA 2018 (unshielded),
// the others from the IUPAC 2001 recommendations.
var nuclei = []Nucleus{
	{"1H", ProtonGammaBar, codata2018},
	{"2H", 6.535901e6, iupac2001},
	{"3He", -32.436030e6, iupac2001},
	{"7Li", 16.548456e6, iupac2001},
	{"13C", 10.708397e6, iupac2001},
	{"15N", -4.317266e6, iupac2001},
	{"17O", -5.774269e6, iupac2001},
	{"19F", 40.077570e6, iupac2001},
	{"23Na", 11.269522e6, iupac2001},
	{"31P", 17.251441e6, iupac2001},
	{"129Xe", -11.860390e6, iupac2001},
}

// Lookup finds a nucleus by name ("31P"); the match is exact.
func Lookup(name string) (Nucleus, bool) {
	for _, n := range nuclei {
		if n.Name == name {
			return n, true
		}
	}
	return Nucleus{}, false
}

// Nuclei lists the known nuclei sorted by mass number.
func Nuclei() []Nucleus {
	out := append([]Nucleus(nil), nuclei...)
	sort.SliceStable(out, func(i, j int) bool { return massNumber(out[i].Name) < massNumber(out[j].Name) })
	return out
}

func massNumber(s string) int {
	n := 0
	for _, r := range s {
		if r < '0' || r > '9' {
			break
		}
		n = n*10 + int(r-'0')
	}
	return n
}

// NucleusNames lists the names of the known nuclei, for messages.
func NucleusNames() string {
	var names []string
	for _, n := range Nuclei() {
		names = append(names, n.Name)
	}
	return strings.Join(names, " ")
}
