// Package prebind binds the kernel's listening sockets while the program is
// still starting, before the plotting libraries' package initialisers run.
//
// Jupyter clients connect to a kernel's ports a few milliseconds after they
// start it; a port that is not yet listening refuses the connection, and the
// client's ZeroMQ library waits 100 ms before it tries again. Go initialises
// packages in import-path order, taking at each step the first package whose
// imports are done. This package sorts first (the module path "Nutate" sorts
// before every lower-case path) and imports only os and packages os itself
// needs, so its init runs right after os's, about 10 ms before main (measured:
// GODEBUG=inittrace=1; TestBinary checks the order).
//
// Anything unexpected (another command, an unreadable or unusual connection
// file, an IPv6 address or host name, a port already taken) leaves that port
// unbound: the kernel then binds it itself and reports errors as usual.
//
// Binding happens on Linux and macOS (bind_unix.go). Elsewhere, and in a
// binary built with the tag noprebind, bind binds nothing (bind_other.go) and
// the kernel binds every port itself, after the package initialisers: a client
// that connects before then waits for ZeroMQ's reconnect (BenchmarkE2EKernel
// and BenchmarkE2EKernelNoPrebind in the root package measure the difference).
package prebind

import (
	"os"
	"sync"
)

var (
	mu    sync.Mutex
	bound = map[string]*os.File{}
)

func init() { bindAll(os.Args) }

// portNames are the connection file's port fields.
var portNames = []string{"shell_port", "iopub_port", "stdin_port", "control_port", "hb_port"}

// bindAll binds the ports of the connection file named by the arguments of
// "nutate kernel" (os.Args).
func bindAll(args []string) {
	path, ok := connectionFile(args)
	if !ok {
		return
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return
	}
	fields, ok := parseFlat(data)
	if !ok {
		return
	}
	mu.Lock()
	defer mu.Unlock()
	for _, name := range portNames {
		port, ok := atoi(fields[name])
		if !ok || port <= 0 || port > 65535 {
			continue
		}
		if network, addr, f := bind(fields["transport"], fields["ip"], port); f != nil {
			bound[network+" "+addr] = f
		}
	}
}

// Take returns the socket bound for network ("tcp" or "unix") and addr, if
// there is one, and forgets it: the caller owns the file.
func Take(network, addr string) *os.File {
	mu.Lock()
	defer mu.Unlock()
	f := bound[network+" "+addr]
	delete(bound, network+" "+addr)
	return f
}

// Release closes every socket not yet taken, so that the kernel can bind
// those addresses itself; a unix socket's file is removed too (binding it
// created the file, and a file left behind would keep the address taken).
func Release() {
	mu.Lock()
	defer mu.Unlock()
	for k, f := range bound {
		f.Close()
		if len(k) > 5 && k[:5] == "unix " { // strings would initialise later than os
			os.Remove(k[5:])
		}
		delete(bound, k)
	}
}

// connectionFile finds the connection file in the arguments of "nutate kernel".
func connectionFile(args []string) (string, bool) {
	if len(args) < 3 || args[1] != "kernel" {
		return "", false
	}
	rest := args[2:]
	switch {
	case len(rest) == 1 && len(rest[0]) > 0 && rest[0][0] != '-':
		return rest[0], true
	case len(rest) == 2 && (rest[0] == "--connection-file" || rest[0] == "-connection-file"):
		return rest[1], true
	case len(rest) == 1:
		for _, p := range []string{"--connection-file=", "-connection-file="} {
			if len(rest[0]) > len(p) && rest[0][:len(p)] == p {
				return rest[0][len(p):], true
			}
		}
	}
	return "", false
}

// parseFlat reads a JSON object whose values are strings, numbers, booleans or
// null (a Jupyter connection file) into raw text by key. Strings with escapes,
// nested values and anything malformed make it give up: encoding/json would
// pull in packages that initialise late, and giving up only costs speed.
func parseFlat(b []byte) (map[string]string, bool) {
	out := map[string]string{}
	i := 0
	skip := func() {
		for i < len(b) && (b[i] == ' ' || b[i] == '\t' || b[i] == '\n' || b[i] == '\r') {
			i++
		}
	}
	str := func() (string, bool) {
		if i >= len(b) || b[i] != '"' {
			return "", false
		}
		for j := i + 1; j < len(b); j++ {
			switch b[j] {
			case '\\':
				return "", false
			case '"':
				s := string(b[i+1 : j])
				i = j + 1
				return s, true
			}
		}
		return "", false
	}
	skip()
	if i >= len(b) || b[i] != '{' {
		return nil, false
	}
	i++
	skip()
	if i < len(b) && b[i] == '}' {
		return out, true
	}
	for {
		skip()
		key, ok := str()
		if !ok {
			return nil, false
		}
		skip()
		if i >= len(b) || b[i] != ':' {
			return nil, false
		}
		i++
		skip()
		if i >= len(b) {
			return nil, false
		}
		if b[i] == '"' {
			if out[key], ok = str(); !ok {
				return nil, false
			}
		} else {
			j := i
			for j < len(b) && (b[j] == '-' || b[j] == '+' || b[j] == '.' || b[j] >= '0' && b[j] <= '9' || b[j] >= 'a' && b[j] <= 'z' || b[j] == 'E') {
				j++
			}
			if j == i {
				return nil, false
			}
			out[key] = string(b[i:j])
			i = j
		}
		skip()
		if i >= len(b) {
			return nil, false
		}
		switch b[i] {
		case ',':
			i++
		case '}':
			i++
			skip()
			return out, i == len(b)
		default:
			return nil, false
		}
	}
}

// parseIPv4 reads a dotted-quad address without leading zeros.
func parseIPv4(s string) (a [4]byte, ok bool) {
	parts := 0
	for len(s) > 0 && parts < 4 {
		j := 0
		for j < len(s) && s[j] != '.' {
			j++
		}
		v, ok := atoi(s[:j])
		if !ok || v > 255 || j > 1 && s[0] == '0' {
			return a, false
		}
		a[parts] = byte(v)
		parts++
		if j == len(s) {
			return a, parts == 4
		}
		s = s[j+1:]
	}
	return a, false
}

// atoi reads a non-negative decimal integer of at most 9 digits.
func atoi(s string) (int, bool) {
	if len(s) == 0 || len(s) > 9 {
		return 0, false
	}
	n := 0
	for i := 0; i < len(s); i++ {
		if s[i] < '0' || s[i] > '9' {
			return 0, false
		}
		n = n*10 + int(s[i]-'0')
	}
	return n, true
}

func itoa(n int) string {
	if n == 0 {
		return "0"
	}
	var b [20]byte
	i := len(b)
	for ; n > 0; n /= 10 {
		i--
		b[i] = byte('0' + n%10)
	}
	return string(b[i:])
}
