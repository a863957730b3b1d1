package lsp

import (
	"bufio"
	"encoding/json"
	"fmt"
	"io"
	"strings"
	"testing"
	"time"

	"calcdoc/calcdoc/kind"
)

// client drives a server through pipes with framed JSON-RPC messages, as
// an editor does.
type client struct {
	t      testing.TB
	srv    *Server
	in     *io.PipeWriter // the server's input
	out    *io.PipeReader // the server's output
	next   int
	resps  chan *message // responses
	notes  chan *message // notifications
	done   chan int      // the server's exit status
	closed chan struct{}
}

func newClient(t testing.TB, debounce time.Duration) *client {
	t.Helper()
	inR, inW := io.Pipe()
	outR, outW := io.Pipe()
	s := New(kind.Standard())
	s.Debounce = debounce
	c := &client{t: t, srv: s, in: inW, out: outR, resps: make(chan *message, 100), notes: make(chan *message, 10000), done: make(chan int, 1), closed: make(chan struct{})}
	go func() {
		c.done <- s.Run(inR, outW)
		outW.Close()
	}()
	go func() {
		defer close(c.closed)
		r := bufio.NewReader(outR)
		for {
			body, err := readMessage(r)
			if err != nil {
				return
			}
			var m message
			if err := json.Unmarshal(body, &m); err != nil {
				t.Errorf("the server wrote a body that is not JSON: %q", body)
				return
			}
			if m.Method != "" {
				c.notes <- &m
			} else {
				c.resps <- &m
			}
		}
	}()
	t.Cleanup(func() {
		c.in.Close()
		select {
		case <-c.done:
		case <-time.After(10 * time.Second):
			t.Errorf("the server did not stop when its input closed")
		}
	})
	return c
}

// raw writes a body with its header.
func (c *client) raw(body string) {
	c.t.Helper()
	if _, err := fmt.Fprintf(c.in, "Content-Length: %d\r\n\r\n%s", len(body), body); err != nil {
		c.t.Fatal(err)
	}
}

// send writes a message.
func (c *client) send(v any) {
	c.t.Helper()
	b, err := json.Marshal(v)
	if err != nil {
		c.t.Fatal(err)
	}
	c.raw(string(b))
}

// notify sends a notification.
func (c *client) notify(method string, params any) {
	c.t.Helper()
	c.send(map[string]any{"jsonrpc": "2.0", "method": method, "params": params})
}

// response waits for the next response.
func (c *client) response() *message {
	c.t.Helper()
	select {
	case m := <-c.resps:
		return m
	case <-time.After(10 * time.Second):
		c.t.Fatalf("no response in 10 s")
	}
	return nil
}

// call sends a request and decodes its result into res; it fails on an
// error response.
func (c *client) call(method string, params, res any) {
	c.t.Helper()
	c.next++
	c.send(map[string]any{"jsonrpc": "2.0", "id": c.next, "method": method, "params": params})
	m := c.response()
	if string(m.ID) != fmt.Sprint(c.next) {
		c.t.Fatalf("%s: response id %s, want %d", method, m.ID, c.next)
	}
	if m.Error != nil {
		c.t.Fatalf("%s: error %v", method, m.Error)
	}
	if res != nil {
		if err := json.Unmarshal(m.Result, res); err != nil {
			c.t.Fatalf("%s: result %s: %v", method, m.Result, err)
		}
	}
}

// initialize runs the handshake, offering the position encodings given
// (none: the client says nothing, and UTF-16 is used).
func (c *client) initialize(root string, encodings ...string) map[string]any {
	c.t.Helper()
	caps := map[string]any{}
	if len(encodings) > 0 {
		caps["general"] = map[string]any{"positionEncodings": encodings}
	}
	p := map[string]any{"processId": nil, "capabilities": caps}
	if root != "" {
		p["rootUri"] = pathURI(root)
	}
	var res map[string]any
	c.call("initialize", p, &res)
	c.notify("initialized", map[string]any{})
	return res
}

type publishParams struct {
	URI         string       `json:"uri"`
	Version     int          `json:"version"`
	Diagnostics []Diagnostic `json:"diagnostics"`
}

// diagnostics waits for the diagnostics of uri at version.
func (c *client) diagnostics(uri string, version int) []Diagnostic {
	c.t.Helper()
	// generous: spending the whole work budget takes seconds, and many
	// times that under the race detector on a loaded machine
	deadline := time.After(120 * time.Second)
	for {
		select {
		case m := <-c.notes:
			if m.Method != "textDocument/publishDiagnostics" {
				continue
			}
			var p publishParams
			if err := json.Unmarshal(m.Params, &p); err != nil {
				c.t.Fatal(err)
			}
			if p.URI == uri && p.Version == version {
				return p.Diagnostics
			}
		case <-deadline:
			c.t.Fatalf("no diagnostics of %s version %d in 120 s", uri, version)
			return nil
		}
	}
}

// open sends didOpen.
func (c *client) open(uri, text string, version int) {
	c.notify("textDocument/didOpen", map[string]any{"textDocument": map[string]any{"uri": uri, "languageId": "markdown", "version": version, "text": text}})
}

// change sends one incremental change.
func (c *client) change(uri string, version int, r Range, text string) {
	c.notify("textDocument/didChange", map[string]any{
		"textDocument":   map[string]any{"uri": uri, "version": version},
		"contentChanges": []any{map[string]any{"range": r, "text": text}},
	})
}

// shutdownExit sends shutdown and exit and checks the exit status 0.
func (c *client) shutdownExit() {
	c.t.Helper()
	c.call("shutdown", nil, nil)
	c.notify("exit", nil)
	select {
	case st := <-c.done:
		if st != 0 {
			c.t.Errorf("exit status after shutdown and exit: %d, want 0", st)
		}
		c.done <- st
	case <-time.After(10 * time.Second):
		c.t.Fatalf("the server did not exit")
	}
}

func at(line, char int) Position { return Position{Line: line, Character: char} }

func docParams(uri string, p Position) map[string]any {
	return map[string]any{"textDocument": map[string]any{"uri": uri}, "position": p}
}

func contains(s string, parts ...string) bool {
	for _, p := range parts {
		if !strings.Contains(s, p) {
			return false
		}
	}
	return true
}
