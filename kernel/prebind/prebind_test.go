package prebind

import (
	"fmt"
	"net"
	"os"
	"path/filepath"
	"testing"
)

func TestParseFlat(t *testing.T) {
	// A connection file as jupyter_client writes it.
	good := `{
  "shell_port": 41231,
  "iopub_port": 41232,
  "ip": "127.0.0.1",
  "key": "0d3a1b4c-5e6f",
  "transport": "tcp",
  "signature_scheme": "hmac-sha256",
  "kernel_name": "nutate",
  "ratio": -1.5e3,
  "flag": true,
  "none": null
}`
	f, ok := parseFlat([]byte(good))
	if !ok {
		t.Fatal("a plain connection file was not read")
	}
	for k, want := range map[string]string{"shell_port": "41231", "ip": "127.0.0.1", "transport": "tcp", "ratio": "-1.5e3", "flag": "true", "none": "null"} {
		if f[k] != want {
			t.Errorf("%s = %q, want %q", k, f[k], want)
		}
	}
	if f, ok := parseFlat([]byte(` {} `)); !ok || len(f) != 0 {
		t.Errorf("empty object: %v %v", f, ok)
	}
	for _, bad := range []string{
		``, `[]`, `{`, `{"a"}`, `{"a": }`, `{"a": 1,}`, `{"a": 1} x`, `{"a": 1 "b": 2}`,
		`{"ip": "127.0.0.\u0031"}`, // escapes: given up on, not decoded
		`{"ip": "127.0.0.1\"}`,
		`{"a": {"b": 1}}`, `{"a": [1]}`, `{"a": "unterminated}`,
	} {
		if _, ok := parseFlat([]byte(bad)); ok {
			t.Errorf("%q was read; want it refused", bad)
		}
	}
}

func TestConnectionFile(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"nutate", "kernel", "--connection-file", "/r/k.json"}, "/r/k.json"},
		{[]string{"nutate", "kernel", "-connection-file", "/r/k.json"}, "/r/k.json"},
		{[]string{"nutate", "kernel", "--connection-file=/r/k.json"}, "/r/k.json"},
		{[]string{"nutate", "kernel", "/r/k.json"}, "/r/k.json"},
		{[]string{"nutate", "kernel"}, ""},
		{[]string{"nutate", "run", "a.ipynb"}, ""},
		{[]string{"nutate", "kernel", "--connection-file"}, ""},
		{[]string{"nutate", "kernel", "--connection-file=", "x"}, ""},
		{[]string{"nutate", "kernel", "a", "b"}, ""},
		{[]string{"nutate"}, ""},
	} {
		got, ok := connectionFile(c.args)
		if got != c.want || ok != (c.want != "") {
			t.Errorf("%q: got %q %v, want %q", c.args, got, ok, c.want)
		}
	}
}

func TestParseIPv4(t *testing.T) {
	for s, want := range map[string]bool{
		"127.0.0.1": true, "0.0.0.0": true, "255.255.255.255": true, "10.1.20.3": true,
		"256.0.0.1": false, "127.0.0": false, "127.0.0.1.": false, "127.0.0.1.5": false,
		"127.00.0.1": false, ".1.2.3": false, "::1": false, "localhost": false, "": false,
		"1.2.3.-4": false, "1..2.3": false,
	} {
		a, ok := parseIPv4(s)
		if ok != want {
			t.Errorf("parseIPv4(%q) ok = %v, want %v", s, ok, want)
			continue
		}
		if ok && net.IP(a[:]).String() != s {
			t.Errorf("parseIPv4(%q) = %v", s, a)
		}
	}
}

func TestItoaAtoi(t *testing.T) {
	for _, n := range []int{0, 7, 10, 65535, 123456789} {
		if got, ok := atoi(itoa(n)); !ok || got != n || itoa(n) != fmt.Sprint(n) {
			t.Errorf("%d -> %q -> %d %v", n, itoa(n), got, ok)
		}
	}
	for _, s := range []string{"", "-1", "1x", "1234567890", " 1"} {
		if _, ok := atoi(s); ok {
			t.Errorf("atoi(%q) accepted", s)
		}
	}
}

// freePorts returns n TCP ports that were free a moment ago.
func freePorts(t *testing.T, n int) []int {
	var ports []int
	var ls []net.Listener
	for range n {
		l, err := net.Listen("tcp", "127.0.0.1:0")
		if err != nil {
			t.Fatal(err)
		}
		ls = append(ls, l)
		ports = append(ports, l.Addr().(*net.TCPAddr).Port)
	}
	for _, l := range ls {
		l.Close()
	}
	return ports
}

func writeConn(t *testing.T, transport, ip string, ports []int) string {
	path := filepath.Join(t.TempDir(), "kernel.json")
	body := fmt.Sprintf(`{"transport": %q, "ip": %q, "key": "k", "signature_scheme": "hmac-sha256",
"shell_port": %d, "iopub_port": %d, "stdin_port": %d, "control_port": %d, "hb_port": %d}`,
		transport, ip, ports[0], ports[1], ports[2], ports[3], ports[4])
	if err := os.WriteFile(path, []byte(body), 0o600); err != nil {
		t.Fatal(err)
	}
	return path
}

func TestBindAllSkips(t *testing.T) {
	ports := freePorts(t, 5)
	for _, c := range []struct{ transport, ip string }{
		{"tcp", "::1"}, {"tcp", "localhost"}, {"udp", "127.0.0.1"}, {"tcp", ""},
	} {
		bindAll([]string{"nutate", "kernel", writeConn(t, c.transport, c.ip, ports)})
		mu.Lock()
		n := len(bound)
		mu.Unlock()
		Release()
		if n != 0 {
			t.Errorf("transport %q ip %q: %d sockets bound, want none", c.transport, c.ip, n)
		}
	}
	// Not the kernel command, or no file: nothing is read.
	bindAll([]string{"nutate", "run", writeConn(t, "tcp", "127.0.0.1", ports)})
	bindAll([]string{"nutate", "kernel", filepath.Join(t.TempDir(), "missing.json")})
	mu.Lock()
	defer mu.Unlock()
	if len(bound) != 0 {
		t.Errorf("%d sockets bound for other commands or a missing file", len(bound))
	}
}
