//go:build linux

package kernel

import (
	"bufio"
	"encoding/json"
	"io"
	"log"
	"net"
	"os"
	"os/exec"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/go-zeromq/zmq4"
)

// floodChildEnv makes the test binary run a kernel for TestUncheckedFloodMemory.
const floodChildEnv = "NUTATE_KERNEL_FLOOD_CHILD"

// floodHeadroom caps the child's address space at what it has mapped once
// started plus this much. Without the in-flight bound, 80 connections each
// announcing an 8 MiB frame would make zmq4 allocate 640 MiB (and, with the
// former 256 MiB frame bound, 20 GiB) and the child would die of it.
const floodHeadroom = 384 << 20

// TestUncheckedFloodMemory starts a kernel in a child process whose address
// space is capped, sends it 80 connections that each announce the largest
// frame and never finish it (no key, nothing signed), and measures the child's
// peak resident memory: the unchecked bytes stay within MaxInFlight, the
// kernel is not killed and still answers its heartbeat.
func TestUncheckedFloodMemory(t *testing.T) {
	if os.Getenv(floodChildEnv) == "1" {
		floodChild()
		return
	}
	if testing.Short() {
		t.Skip("starts a child kernel")
	}
	cmd := exec.Command(os.Args[0], "-test.run=^TestUncheckedFloodMemory$")
	cmd.Env = append(os.Environ(), floodChildEnv+"=1")
	stdin, _ := cmd.StdinPipe()
	stdout, _ := cmd.StdoutPipe()
	cmd.Stderr = os.Stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	defer func() {
		stdin.Close()
		cmd.Wait()
	}()
	var info ConnectionInfo
	line, err := bufio.NewReader(stdout).ReadString('\n')
	if err != nil || json.Unmarshal([]byte(line), &info) != nil {
		t.Fatalf("child kernel did not start: %q, %v", line, err)
	}
	base := peakRSS(t, cmd.Process.Pid)

	const conns = 80
	body := make([]byte, MaxFrameSize-1) // one byte short: zmq4 holds the frame
	hdr := []byte{0x02, 0, 0, 0, 0, 0, 0, 0, 0}
	hdr[5] = byte(MaxFrameSize >> 24)
	hdr[6] = byte(MaxFrameSize >> 16)
	sent := make(chan error, conns)
	for i := 0; i < conns; i++ {
		c, err := net.Dial("tcp", "127.0.0.1:"+strconv.Itoa(info.ShellPort))
		if err != nil {
			t.Fatal(err)
		}
		defer c.Close()
		handshakeRaw(t, c)
		go func() {
			c.SetWriteDeadline(time.Now().Add(time.Minute)) // a bound for a failing test
			if _, err := c.Write(hdr); err != nil {
				sent <- err
				return
			}
			_, err := c.Write(body)
			sent <- err
		}()
	}
	// The first two fill the room for unchecked bytes (2 × 8 MiB); the rest
	// wait for room and are read no further.
	for done := 0; done < 2; done++ {
		if err := <-sent; err != nil {
			t.Fatalf("a frame that fits was not read: %v", err)
		}
	}
	hb := dial(t, info.HBPort, zmq4.Req)
	if err := hb.SendMsg(zmq4.NewMsgString("ping")); err != nil {
		t.Fatal(err)
	}
	if m, err := hb.RecvMsg(); err != nil || string(m.Frames[0]) != "ping" {
		t.Fatalf("heartbeat during the flood: got %v, %v", m.Frames, err)
	}
	peak := peakRSS(t, cmd.Process.Pid)
	t.Logf("child kernel peak RSS: %d MiB before the flood, %d MiB during it (in-flight bound %d MiB)", base>>20, peak>>20, MaxInFlight>>20)
	if grew := peak - base; grew > 2*MaxInFlight+32<<20 {
		t.Fatalf("peak RSS grew by %d MiB under the flood, want at most about %d MiB", grew>>20, (2*MaxInFlight+32<<20)>>20)
	}
}

// floodChild runs a kernel with the address space capped, prints its
// connection info and serves until standard input closes.
func floodChild() {
	s, err := start(ConnectionInfo{IP: "127.0.0.1", Key: testKey, SignatureScheme: "hmac-sha256"},
		&fakeExec{started: make(chan struct{}, 1)}, log.New(io.Discard, "", 0), nil)
	if err != nil {
		os.Stderr.WriteString("flood child: " + err.Error() + "\n")
		os.Exit(2)
	}
	// The Go runtime reserves address space ahead of use, so the cap is set
	// relative to what the started kernel has mapped.
	size := procStatus(os.Getpid(), "VmSize:")
	lim := syscall.Rlimit{Cur: uint64(size + floodHeadroom), Max: uint64(size + floodHeadroom)}
	if err := syscall.Setrlimit(syscall.RLIMIT_AS, &lim); size == 0 || err != nil {
		os.Stderr.WriteString("flood child: cannot cap the address space\n")
		os.Exit(2)
	}
	b, _ := json.Marshal(s.Info())
	os.Stdout.Write(append(b, '\n'))
	io.Copy(io.Discard, os.Stdin)
	s.Shutdown()
	<-s.Done()
	os.Exit(0)
}

// peakRSS reads a process's peak resident set (VmHWM) in bytes.
func peakRSS(t *testing.T, pid int) int {
	t.Helper()
	n := procStatus(pid, "VmHWM:")
	if n == 0 {
		t.Skip("no VmHWM in /proc")
	}
	return n
}

// procStatus reads a size field of /proc/PID/status in bytes, 0 if absent.
func procStatus(pid int, field string) int {
	b, err := os.ReadFile("/proc/" + strconv.Itoa(pid) + "/status")
	if err != nil {
		return 0
	}
	for _, l := range strings.Split(string(b), "\n") {
		if f := strings.Fields(l); len(f) == 3 && f[0] == field {
			kb, _ := strconv.Atoi(f[1])
			return kb << 10
		}
	}
	return 0
}
