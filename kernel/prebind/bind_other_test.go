//go:build !(linux || darwin) || noprebind

package prebind

import (
	"fmt"
	"testing"
)

// Where ports are not bound early, a valid connection file leaves nothing
// bound, so the kernel's listen finds nothing to take and binds every port
// itself.
func TestBindAllBindsNothingHere(t *testing.T) {
	ports := freePorts(t, 5)
	bindAll([]string{"nutate", "kernel", "--connection-file", writeConn(t, "tcp", "127.0.0.1", ports)})
	defer Release()
	for _, p := range ports {
		if f := Take("tcp", fmt.Sprintf("127.0.0.1:%d", p)); f != nil {
			f.Close()
			t.Errorf("port %d bound by the fallback, want it left to the kernel", p)
		}
	}
}
