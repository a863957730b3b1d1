// Package lsp is `calcdoc lsp`: a language server (LSP 3.17) over
// standard input and output that evaluates the editor's text as it is
// typed and answers with diagnostics, hovers, inlay hints, definitions,
// completions and document symbols.
//
// The JSON-RPC 2.0 base layer is written here by hand (this file): the
// server needs a handful of message types, and the framing is a header
// of Content-Length and a JSON body, so a dependency would bring more
// than it saves.
package lsp

import (
	"bufio"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"
	"sync"
)

// JSON-RPC 2.0 error codes (JSON-RPC 2.0 specification, section 5.1; the
// last two are LSP's).
const (
	codeParseError           = -32700
	codeInvalidRequest       = -32600
	codeMethodNotFound       = -32601
	codeInvalidParams        = -32602
	codeInternalError        = -32603
	codeServerNotInitialized = -32002
	codeRequestCancelled     = -32800
)

// maxMessage is the largest body the server reads (64 MiB): a header
// that announces more is answered with an error and the body skipped.
const maxMessage = 64 << 20

// message is one JSON-RPC message as read: a request (ID and Method), a
// notification (Method, no ID) or a response (ID, no Method).
type message struct {
	JSONRPC string          `json:"jsonrpc"`
	ID      json.RawMessage `json:"id,omitempty"`
	Method  string          `json:"method,omitempty"`
	Params  json.RawMessage `json:"params,omitempty"`
	Result  json.RawMessage `json:"result,omitempty"`
	Error   *rpcError       `json:"error,omitempty"`
}

// rpcError is a JSON-RPC error object.
type rpcError struct {
	Code    int    `json:"code"`
	Message string `json:"message"`
}

func (e *rpcError) Error() string { return fmt.Sprintf("%s (code %d)", e.Message, e.Code) }

// response is a JSON-RPC response; ID is null when the request's id could
// not be read.
type response struct {
	JSONRPC string          `json:"jsonrpc"`
	ID      json.RawMessage `json:"id"`
	Result  any             `json:"result"`
	Error   *rpcError       `json:"error,omitempty"`
}

// responseErr is a response with an error (no result member).
type responseErr struct {
	JSONRPC string          `json:"jsonrpc"`
	ID      json.RawMessage `json:"id"`
	Error   *rpcError       `json:"error"`
}

// notification is a JSON-RPC notification the server sends.
type notification struct {
	JSONRPC string `json:"jsonrpc"`
	Method  string `json:"method"`
	Params  any    `json:"params"`
}

// errFraming is a header that cannot be read: the stream is out of step
// and the server stops.
var errFraming = errors.New("lsp: the message header cannot be read")

// readMessage reads one framed message: header lines up to an empty line
// (Content-Length required, Content-Type ignored), then the body. A bad
// Content-Length gives errFraming; end of input gives io.EOF.
func readMessage(r *bufio.Reader) ([]byte, error) {
	length := -1
	for {
		line, err := r.ReadString('\n')
		if err != nil {
			if err == io.EOF && line == "" {
				return nil, io.EOF
			}
			return nil, io.ErrUnexpectedEOF
		}
		line = strings.TrimRight(line, "\r\n")
		if line == "" {
			if length < 0 {
				continue // blank lines between messages
			}
			break
		}
		name, value, ok := strings.Cut(line, ":")
		if !ok {
			return nil, fmt.Errorf("%w: %q is not a header line", errFraming, line)
		}
		if strings.EqualFold(strings.TrimSpace(name), "Content-Length") {
			n, err := strconv.Atoi(strings.TrimSpace(value))
			if err != nil || n < 0 {
				return nil, fmt.Errorf("%w: Content-Length %q", errFraming, value)
			}
			length = n
		}
	}
	if length > maxMessage {
		if _, err := io.CopyN(io.Discard, r, int64(length)); err != nil {
			return nil, io.ErrUnexpectedEOF
		}
		return nil, errTooLarge
	}
	body := make([]byte, length)
	if _, err := io.ReadFull(r, body); err != nil {
		return nil, io.ErrUnexpectedEOF
	}
	return body, nil
}

// errTooLarge is a message longer than maxMessage (skipped).
var errTooLarge = errors.New("message longer than 64 MiB")

// conn writes framed messages; it is safe for use by several goroutines.
type conn struct {
	mu  sync.Mutex
	out io.Writer
}

// write frames and writes v as JSON.
func (c *conn) write(v any) error {
	body, err := json.Marshal(v)
	if err != nil {
		return err
	}
	c.mu.Lock()
	defer c.mu.Unlock()
	if _, err := fmt.Fprintf(c.out, "Content-Length: %d\r\n\r\n", len(body)); err != nil {
		return err
	}
	_, err = c.out.Write(body)
	return err
}

func (c *conn) reply(id json.RawMessage, result any) error {
	return c.write(response{JSONRPC: "2.0", ID: id, Result: result})
}

func (c *conn) replyErr(id json.RawMessage, code int, msg string) error {
	if len(id) == 0 {
		id = json.RawMessage("null")
	}
	return c.write(responseErr{JSONRPC: "2.0", ID: id, Error: &rpcError{Code: code, Message: msg}})
}

func (c *conn) notify(method string, params any) error {
	return c.write(notification{JSONRPC: "2.0", Method: method, Params: params})
}

// decode reads a body as a message and checks its form: a body that is
// not JSON is a parse error, one that is not a JSON-RPC 2.0 request,
// notification or response an invalid request.
func decode(body []byte) (*message, *rpcError) {
	var raw map[string]json.RawMessage
	if err := json.Unmarshal(body, &raw); err != nil {
		// a JSON value that is not an object is an invalid request
		if json.Valid(body) {
			return nil, &rpcError{codeInvalidRequest, "a message is a JSON object (JSON-RPC 2.0)"}
		}
		return nil, &rpcError{codeParseError, "the message is not valid JSON: " + err.Error()}
	}
	var m message
	if err := json.Unmarshal(body, &m); err != nil {
		return &message{ID: validID(raw["id"])}, &rpcError{codeInvalidRequest, "the message's members have the wrong types: " + err.Error()}
	}
	if m.JSONRPC != "2.0" {
		return &message{ID: validID(m.ID)}, &rpcError{codeInvalidRequest, `the message needs "jsonrpc": "2.0"`}
	}
	if m.Method == "" && len(m.ID) == 0 {
		return &message{}, &rpcError{codeInvalidRequest, "the message has neither a method nor an id"}
	}
	if len(m.ID) > 0 && validID(m.ID) == nil {
		return &message{}, &rpcError{codeInvalidRequest, "an id is a number or a string"}
	}
	return &m, nil
}

// validID is id when it is a number or a string, else nil.
func validID(id json.RawMessage) json.RawMessage {
	if len(id) == 0 {
		return nil
	}
	switch id[0] {
	case '"', '-', '0', '1', '2', '3', '4', '5', '6', '7', '8', '9':
		return id
	}
	return nil
}
