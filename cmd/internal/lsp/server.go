package lsp

import (
	"bufio"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"sync"
	"time"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// DefaultDebounce is how long the server waits after the last change of a
// document before it evaluates it.
const DefaultDebounce = 150 * time.Millisecond

// Server is one language server session.
type Server struct {
	// Debounce is the wait after a change before evaluation.
	Debounce time.Duration
	// Version is shown in the initialize result's serverInfo.
	Version string

	kinds *calcdoc.Registry
	conn  *conn

	mu          sync.Mutex
	enc         string // the negotiated position encoding
	root        string // the workspace folder, or ""
	initialized bool
	shutdown    bool
	docs        map[string]*docState // by URI
	evals       sync.WaitGroup

	// debounced, when set, is called as a document's debounce ends, just
	// before it is evaluated (the benchmark's clock starts there).
	debounced func(uri string)
}

// docState is an open document.
type docState struct {
	uri, path string
	version   int
	text      *text
	gen       int64        // counts the changes
	timer     *time.Timer  // the debounce
	budget    *expr.Budget // the running evaluation's
	closed    bool

	// the last evaluation: the document, the text it was read from, and
	// the fingerprint of its values ("" when not made)
	doc   *calcdoc.Document
	dtext *text
	fp    string
	uses  map[string]bool // real paths of the documents it uses
}

// New makes a server that evaluates with the kinds of reg.
func New(reg *calcdoc.Registry) *Server {
	return &Server{Debounce: DefaultDebounce, kinds: reg, enc: encUTF16, docs: map[string]*docState{}}
}

// Run serves the messages read from in, writing to out, until the exit
// notification or the end of in. It returns the exit status LSP asks for:
// 0 when shutdown came before exit, 1 otherwise.
func (s *Server) Run(in io.Reader, out io.Writer) int {
	s.conn = &conn{out: out}
	r := bufio.NewReaderSize(in, 64<<10)
	defer s.stopAll()
	for {
		body, err := readMessage(r)
		switch {
		case errors.Is(err, errTooLarge):
			s.conn.replyErr(nil, codeInvalidRequest, err.Error())
			continue
		case errors.Is(err, errFraming):
			// the stream is out of step: answer, then read on from the
			// next header
			s.conn.replyErr(nil, codeParseError, err.Error())
			continue
		case err != nil:
			return s.exitStatus()
		}
		m, perr := decode(body)
		if perr != nil {
			var id json.RawMessage
			if m != nil {
				id = m.ID
			}
			s.conn.replyErr(id, perr.Code, perr.Message)
			continue
		}
		if m.Method == "" {
			continue // a response to a request of ours: none are sent
		}
		if m.Method == "exit" {
			return s.exitStatus()
		}
		s.handle(m)
	}
}

func (s *Server) exitStatus() int {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.shutdown {
		return 0
	}
	return 1
}

// stopAll stops every debounce and evaluation and waits for them.
func (s *Server) stopAll() {
	s.mu.Lock()
	for _, st := range s.docs {
		st.closed = true
		if st.timer != nil {
			st.timer.Stop()
		}
		st.budget.Stop()
	}
	s.mu.Unlock()
	s.evals.Wait()
}

// handle answers one request or notification.
func (s *Server) handle(m *message) {
	isRequest := len(m.ID) > 0
	defer func() {
		// a handler's panic is a bug: answer it, and go on
		if p := recover(); p != nil && isRequest {
			s.conn.replyErr(m.ID, codeInternalError, fmt.Sprintf("internal error in %s: %v", m.Method, p))
		}
	}()
	s.mu.Lock()
	initialized, shutdown := s.initialized, s.shutdown
	s.mu.Unlock()
	if m.Method != "initialize" && !initialized {
		if isRequest {
			s.conn.replyErr(m.ID, codeServerNotInitialized, "the server is not initialized: send initialize first")
		}
		return
	}
	if shutdown && isRequest {
		s.conn.replyErr(m.ID, codeInvalidRequest, "the server is shut down: only exit is accepted")
		return
	}
	h, ok := handlers[m.Method]
	if !ok {
		if isRequest {
			s.conn.replyErr(m.ID, codeMethodNotFound, "method not found: "+m.Method)
		}
		return // notifications the server does not know are ignored
	}
	res, err := h(s, m.Params)
	if !isRequest {
		return
	}
	if err != nil {
		var re *rpcError
		if !errors.As(err, &re) {
			re = &rpcError{codeInternalError, err.Error()}
		}
		s.conn.replyErr(m.ID, re.Code, re.Message)
		return
	}
	s.conn.reply(m.ID, res)
}

type handler func(s *Server, params json.RawMessage) (any, error)

var handlers map[string]handler

func init() {
	handlers = map[string]handler{
		"initialize":                  (*Server).initialize,
		"initialized":                 func(*Server, json.RawMessage) (any, error) { return nil, nil },
		"shutdown":                    (*Server).doShutdown,
		"textDocument/didOpen":        (*Server).didOpen,
		"textDocument/didChange":      (*Server).didChange,
		"textDocument/didClose":       (*Server).didClose,
		"textDocument/didSave":        func(*Server, json.RawMessage) (any, error) { return nil, nil },
		"textDocument/hover":          (*Server).hover,
		"textDocument/inlayHint":      (*Server).inlayHint,
		"textDocument/definition":     (*Server).definition,
		"textDocument/completion":     (*Server).completion,
		"textDocument/documentSymbol": (*Server).documentSymbol,
		"textDocument/codeAction":     (*Server).codeAction,
		"$/cancelRequest":             func(*Server, json.RawMessage) (any, error) { return nil, nil },
		"$/setTrace":                  func(*Server, json.RawMessage) (any, error) { return nil, nil },
	}
}

// params decodes a request's params; a mismatch is InvalidParams.
func params(raw json.RawMessage, v any) error {
	if len(raw) == 0 {
		return &rpcError{codeInvalidParams, "the request needs params"}
	}
	if err := json.Unmarshal(raw, v); err != nil {
		return &rpcError{codeInvalidParams, "the params cannot be read: " + err.Error()}
	}
	return nil
}

type initializeParams struct {
	RootURI          string `json:"rootUri"`
	RootPath         string `json:"rootPath"`
	WorkspaceFolders []struct {
		URI string `json:"uri"`
	} `json:"workspaceFolders"`
	Capabilities struct {
		General struct {
			PositionEncodings []string `json:"positionEncodings"`
		} `json:"general"`
	} `json:"capabilities"`
}

func (s *Server) initialize(raw json.RawMessage) (any, error) {
	var p initializeParams
	if err := params(raw, &p); err != nil {
		return nil, err
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.initialized {
		return nil, &rpcError{codeInvalidRequest, "initialize was already sent"}
	}
	// the client's preferred encoding among those it offers; UTF-16 when
	// it offers none (LSP 3.17: UTF-16 must always be supported)
	s.enc = encUTF16
	for _, e := range p.Capabilities.General.PositionEncodings {
		if e == encUTF8 || e == encUTF16 || e == encUTF32 {
			s.enc = e
			break
		}
	}
	switch {
	case len(p.WorkspaceFolders) > 0:
		s.root, _ = uriPath(p.WorkspaceFolders[0].URI)
	case p.RootURI != "":
		s.root, _ = uriPath(p.RootURI)
	default:
		s.root = p.RootPath
	}
	s.initialized = true
	return map[string]any{
		"capabilities": map[string]any{
			"positionEncoding": s.enc,
			"textDocumentSync": map[string]any{
				"openClose": true,
				"change":    2, // incremental (full text is taken too)
				"save":      false,
			},
			"hoverProvider":          true,
			"inlayHintProvider":      true,
			"definitionProvider":     true,
			"documentSymbolProvider": true,
			"codeActionProvider":     map[string]any{"codeActionKinds": []string{"quickfix"}},
			"completionProvider":     map[string]any{"triggerCharacters": []string{"[", "("}},
		},
		"serverInfo": map[string]any{"name": "calcdoc", "version": s.Version},
	}, nil
}

func (s *Server) doShutdown(json.RawMessage) (any, error) {
	s.mu.Lock()
	s.shutdown = true
	s.mu.Unlock()
	return nil, nil
}

type textDocumentItem struct {
	URI     string `json:"uri"`
	Version int    `json:"version"`
	Text    string `json:"text"`
}

type docID struct {
	URI     string `json:"uri"`
	Version int    `json:"version"`
}

func (s *Server) didOpen(raw json.RawMessage) (any, error) {
	var p struct {
		TextDocument textDocumentItem `json:"textDocument"`
	}
	if err := params(raw, &p); err != nil {
		return nil, err
	}
	path, err := uriPath(p.TextDocument.URI)
	if err != nil {
		return nil, &rpcError{codeInvalidParams, err.Error()}
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	if old := s.docs[p.TextDocument.URI]; old != nil {
		s.closeLocked(old)
	}
	st := &docState{uri: p.TextDocument.URI, path: path, version: p.TextDocument.Version, text: newText([]byte(p.TextDocument.Text))}
	s.docs[st.uri] = st
	s.scheduleLocked(st)
	return nil, nil
}

func (s *Server) didChange(raw json.RawMessage) (any, error) {
	var p struct {
		TextDocument   docID `json:"textDocument"`
		ContentChanges []struct {
			Range *Range `json:"range"`
			Text  string `json:"text"`
		} `json:"contentChanges"`
	}
	if err := params(raw, &p); err != nil {
		return nil, err
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	st := s.docs[p.TextDocument.URI]
	if st == nil {
		return nil, nil
	}
	t := st.text
	for _, c := range p.ContentChanges {
		if c.Range == nil {
			t = newText([]byte(c.Text))
		} else {
			t = newText(t.edit(*c.Range, c.Text, s.enc))
		}
	}
	st.text, st.version = t, p.TextDocument.Version
	s.scheduleLocked(st)
	return nil, nil
}

func (s *Server) didClose(raw json.RawMessage) (any, error) {
	var p struct {
		TextDocument docID `json:"textDocument"`
	}
	if err := params(raw, &p); err != nil {
		return nil, err
	}
	s.mu.Lock()
	st := s.docs[p.TextDocument.URI]
	if st != nil {
		s.closeLocked(st)
		delete(s.docs, st.uri)
	}
	s.mu.Unlock()
	if st != nil {
		// a closed document's diagnostics go (LSP 3.17, didClose)
		s.conn.notify("textDocument/publishDiagnostics", map[string]any{"uri": st.uri, "diagnostics": []any{}})
	}
	return nil, nil
}

// closeLocked stops a document's debounce and evaluation; s.mu is held.
func (s *Server) closeLocked(st *docState) {
	st.closed = true
	if st.timer != nil {
		st.timer.Stop()
	}
	st.budget.Stop()
}

// scheduleLocked starts the debounce of a changed document and stops its
// running evaluation (its result would be out of date); s.mu is held.
func (s *Server) scheduleLocked(st *docState) {
	st.gen++
	st.budget.Stop()
	if st.timer != nil {
		st.timer.Stop()
	}
	gen := st.gen
	st.timer = time.AfterFunc(s.Debounce, func() {
		// counted under s.mu, so that stopAll, once it has marked the
		// documents closed, waits for every evaluation that started
		s.mu.Lock()
		if st.closed || st.gen != gen {
			s.mu.Unlock()
			return
		}
		s.evals.Add(1)
		s.mu.Unlock()
		defer s.evals.Done()
		s.evaluate(st, gen)
	})
}
