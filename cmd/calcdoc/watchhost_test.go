//go:build unix

package main

import (
	"bufio"
	"fmt"
	"net"
	"net/http"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"syscall"
	"testing"
	"time"
)

var servingPort = regexp.MustCompile(`serving the preview at http://[^ ]*:(\d+)/`)

// getHost sends GET path to 127.0.0.1:port with the given Host header and
// returns the status.
func getHost(t *testing.T, port, path, host string) int {
	t.Helper()
	conn, err := net.DialTimeout("tcp", "127.0.0.1:"+port, 5*time.Second)
	if err != nil {
		t.Fatalf("dial: %v", err)
	}
	defer conn.Close()
	conn.SetDeadline(time.Now().Add(10 * time.Second))
	fmt.Fprintf(conn, "GET %s HTTP/1.1\r\nHost: %s\r\nConnection: close\r\n\r\n", path, host)
	resp, err := http.ReadResponse(bufio.NewReader(conn), nil)
	if err != nil {
		t.Fatalf("GET %s (Host %s): %v", path, host, err)
	}
	resp.Body.Close()
	return resp.StatusCode
}

// TestWatchAllHosts: bound to every interface (0.0.0.0), watch keeps the
// Host check: loopback names, the bound address and --allow-host names are
// answered, any other name gets 403 even on 127.0.0.1 (DNS rebinding), and
// the warning at start names the risk.
func TestWatchAllHosts(t *testing.T) {
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "a.md"), []byte(watchDoc), 0o644); err != nil {
		t.Fatal(err)
	}
	out, errb := &lockedBuffer{}, &lockedBuffer{}
	cl := &cli{stdout: out, stderr: errb}
	status := make(chan int, 1)
	go func() {
		status <- cl.run([]string{"watch", "--addr", "0.0.0.0:0", "--allow-host", "sheets.example", dir})
	}()
	var port string
	end := time.Now().Add(10 * time.Second)
	for port == "" {
		if m := servingPort.FindStringSubmatch(out.String()); m != nil {
			port = m[1]
			break
		}
		select {
		case st := <-status:
			t.Fatalf("watch exited with %d; stderr:\n%s", st, errb.String())
		default:
		}
		if time.Now().After(end) {
			t.Fatalf("watch did not serve within 10 s; stderr:\n%s", errb.String())
		}
		time.Sleep(20 * time.Millisecond)
	}
	cases := []struct {
		host string
		want int
	}{
		{"127.0.0.1:" + port, 200},
		{"localhost:" + port, 200},
		{"[::1]:" + port, 200},
		{"0.0.0.0:" + port, 200},
		{"sheets.example:" + port, 200},
		{"rebind.example:" + port, 403},
		{"sheets.example.rebind.example", 403},
	}
	for _, c := range cases {
		if st := getHost(t, port, "/a.html", c.host); st != c.want {
			t.Errorf("Host %s: status %d, want %d", c.host, st, c.want)
		}
	}
	for _, want := range []string{"warning", "not a loopback address", "DNS rebinding", "--allow-host"} {
		if !strings.Contains(errb.String(), want) {
			t.Errorf("the warning lacks %q:\n%s", want, errb.String())
		}
	}
	if err := syscall.Kill(os.Getpid(), syscall.SIGTERM); err != nil {
		t.Fatal(err)
	}
	select {
	case st := <-status:
		if st != exitOK {
			t.Errorf("status %d after SIGTERM", st)
		}
	case <-time.After(15 * time.Second):
		t.Fatal("watch did not stop within 15 s of SIGTERM")
	}
}
