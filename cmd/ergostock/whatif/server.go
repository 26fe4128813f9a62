package whatif

import (
	"bytes"
	"context"
	"embed"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"net"
	"net/http"
	"runtime"
	"strings"
	"time"

	"ergostock/policies"
)

// maxBody is the largest request body read, in bytes.
const maxBody = 64 << 10

// DefaultTimeout is the default budget of one evaluation or search.
const DefaultTimeout = 20 * time.Second

// Answer is what the engine gives for one request.
type Answer struct {
	JSON   []byte                      // what the command prints with --json
	Levels *policies.LevelDistribution // when asked for
}

// Engine runs the command-line commands evaluate and optimize with the
// flags args (--json implied). A refusal is a *Refusal.
type Engine interface {
	Run(ctx context.Context, command string, args []string, levels bool) (*Answer, error)
}

// Refusal is an input the command refused: its exit status (2 for a
// usage mistake, 1 for an input refused for its size or a failed solve)
// and its one-line message, without the program's name.
type Refusal struct {
	Status  int
	Message string
}

func (r *Refusal) Error() string { return r.Message }

// Config is what a Server serves.
type Config struct {
	Engine    Engine
	Catalogue *Catalogue
	// Decisions is the decisions file (see batch.ReadDecisions).
	Decisions string
	// Timeout bounds one evaluation or search; 0 means DefaultTimeout.
	Timeout time.Duration
	// Log receives one line per failed request (nil: none).
	Log io.Writer
	// AllowRemote lets the server answer requests for any host name
	// (serve --allow-remote); by default only loopback names are served.
	AllowRemote bool
}

// Server is the what-if page and its API; it is an http.Handler.
type Server struct {
	cfg   Config
	mux   *http.ServeMux
	store *store
	slots chan struct{} // evaluations running at once
}

//go:embed page
var pageFS embed.FS

// New returns a Server. It reads the decisions file, if there is one, so
// that the page starts with the decisions already made.
func New(cfg Config) (*Server, error) {
	if cfg.Engine == nil || cfg.Catalogue == nil {
		return nil, errors.New("whatif: an engine and a catalogue are required")
	}
	if cfg.Timeout <= 0 {
		cfg.Timeout = DefaultTimeout
	}
	st, err := openStore(cfg.Decisions, cfg.Catalogue.ByLocation)
	if err != nil {
		return nil, err
	}
	s := &Server{cfg: cfg, mux: http.NewServeMux(), store: st, slots: make(chan struct{}, runtime.GOMAXPROCS(0))}
	sub, err := fs.Sub(pageFS, "page")
	if err != nil {
		return nil, err
	}
	s.mux.Handle("GET /", http.FileServerFS(sub))
	s.mux.HandleFunc("GET /api/items", s.items)
	s.mux.HandleFunc("GET /api/items/{sku}", s.item)
	s.mux.HandleFunc("POST /api/evaluate", s.run("evaluate"))
	s.mux.HandleFunc("POST /api/optimize", s.run("optimize"))
	s.mux.HandleFunc("GET /api/levels", s.levels)
	s.mux.HandleFunc("GET /api/decisions", s.decisions)
	s.mux.HandleFunc("POST /api/decisions", s.decide)
	noAPI := func(w http.ResponseWriter, r *http.Request) {
		switch r.URL.Path {
		case "/api/evaluate", "/api/optimize":
			w.Header().Set("Allow", "POST")
			s.fail(w, r, http.StatusMethodNotAllowed, fmt.Sprintf("%s %s: want POST with a JSON object", r.Method, r.URL.Path))
			return
		case "/api/items", "/api/levels":
			w.Header().Set("Allow", "GET")
			s.fail(w, r, http.StatusMethodNotAllowed, fmt.Sprintf("%s %s: want GET", r.Method, r.URL.Path))
			return
		}
		s.fail(w, r, http.StatusNotFound, fmt.Sprintf("%s %s: no such endpoint (see the package documentation of ergostock/cmd/ergostock/whatif)", r.Method, r.URL.Path))
	}
	s.mux.HandleFunc("GET /api/", noAPI)
	s.mux.HandleFunc("POST /api/", noAPI)
	return s, nil
}

// ServeHTTP serves one request: a request for another host is refused (a
// page elsewhere cannot reach the server through a name that resolves to
// loopback), a POST must be JSON (a form on another site cannot post
// here without the browser asking first), bodies are limited to 64 KiB,
// and a panic answers 500 and leaves the server running.
func (s *Server) ServeHTTP(w http.ResponseWriter, r *http.Request) {
	defer func() {
		if v := recover(); v != nil {
			s.fail(w, r, http.StatusInternalServerError, fmt.Sprintf("internal error: %v (the server goes on)", v))
		}
	}()
	if !localHost(r.Host) && !s.cfg.AllowRemote {
		s.fail(w, r, http.StatusForbidden, fmt.Sprintf("host %q: want a loopback address or localhost", r.Host))
		return
	}
	if r.Method == http.MethodPost {
		ct := strings.ToLower(strings.TrimSpace(strings.Split(r.Header.Get("Content-Type"), ";")[0]))
		if ct != "application/json" {
			s.fail(w, r, http.StatusUnsupportedMediaType, fmt.Sprintf("Content-Type %q: want application/json", r.Header.Get("Content-Type")))
			return
		}
	}
	r.Body = http.MaxBytesReader(w, r.Body, maxBody)
	w.Header().Set("X-Content-Type-Options", "nosniff")
	w.Header().Set("Cache-Control", "no-store")
	s.mux.ServeHTTP(w, r)
}

// localHost reports whether a Host header names this machine's loopback.
func localHost(host string) bool {
	h := host
	if hh, _, err := net.SplitHostPort(host); err == nil {
		h = hh
	}
	h = strings.TrimSuffix(strings.TrimPrefix(h, "["), "]")
	if strings.EqualFold(h, "localhost") {
		return true
	}
	ip := net.ParseIP(h)
	return ip != nil && ip.IsLoopback()
}

// fail answers {"error": msg} with status.
func (s *Server) fail(w http.ResponseWriter, r *http.Request, status int, msg string) {
	msg = oneLine(msg)
	if s.cfg.Log != nil {
		fmt.Fprintf(s.cfg.Log, "ergostock serve: %s %s: %d %s\n", r.Method, r.URL.Path, status, msg)
	}
	writeJSON(w, status, map[string]string{"error": msg})
}

func writeJSON(w http.ResponseWriter, status int, v any) {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	err := enc.Encode(v)
	b := buf.Bytes()
	if err != nil {
		status, b = http.StatusInternalServerError, []byte(`{"error":"cannot encode the answer"}`)
	}
	w.Header().Set("Content-Type", "application/json; charset=utf-8")
	w.WriteHeader(status)
	w.Write(b)
}

// failErr answers the error of a request or of the engine.
func (s *Server) failErr(w http.ResponseWriter, r *http.Request, command string, err error) {
	var re *requestError
	var rf *Refusal
	var ce *conflictError
	switch {
	case errors.As(err, &re):
		s.fail(w, r, re.status, re.msg)
	case errors.As(err, &ce):
		s.fail(w, r, http.StatusConflict, ce.Error())
	case errors.As(err, &rf):
		status := http.StatusBadRequest
		if rf.Status != 2 {
			status = http.StatusUnprocessableEntity
		}
		s.fail(w, r, status, keyMessage(command, rf.Message))
	case errors.Is(err, context.DeadlineExceeded):
		s.fail(w, r, http.StatusServiceUnavailable, fmt.Sprintf("%s: stopped after %v, the server's limit per request", command, s.cfg.Timeout))
	case errors.Is(err, context.Canceled):
		s.fail(w, r, http.StatusServiceUnavailable, command+": the request was cancelled")
	default:
		s.fail(w, r, http.StatusInternalServerError, command+": "+err.Error())
	}
}

// runEngine runs command under the server's time limit and its cap on
// evaluations at once.
func (s *Server) runEngine(ctx context.Context, command string, args []string, levels bool) (*Answer, error) {
	ctx, cancel := context.WithTimeout(ctx, s.cfg.Timeout)
	defer cancel()
	select {
	case s.slots <- struct{}{}:
		defer func() { <-s.slots }()
	case <-ctx.Done():
		return nil, ctx.Err()
	}
	a, err := s.cfg.Engine.Run(ctx, command, args, levels)
	if err != nil && ctx.Err() != nil {
		return nil, ctx.Err()
	}
	return a, err
}

// run is POST /api/evaluate and /api/optimize.
func (s *Server) run(command string) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		obj, err := decodeObject(r.Body)
		if err != nil {
			s.failErr(w, r, command, err)
			return
		}
		args, err := argsOf(command, obj)
		if err != nil {
			s.failErr(w, r, command, err)
			return
		}
		a, err := s.runEngine(r.Context(), command, args, false)
		if err != nil {
			s.failErr(w, r, command, err)
			return
		}
		w.Header().Set("Content-Type", "application/json; charset=utf-8")
		w.Write(a.JSON)
	}
}

// levelsJSON is the stationary law of the stock level for the chart,
// P(level = Min + k) = P[k], with the mass Below and Above the levels
// listed, and the evaluation it comes from (what POST /api/evaluate
// answers for the same inputs), so that the page needs one request a
// change.
type levelsJSON struct {
	Of         policies.Level  `json:"of"`
	Min        int             `json:"min"`
	P          []float64       `json:"p"`
	Below      float64         `json:"below"`
	Above      float64         `json:"above"`
	Evaluation json.RawMessage `json:"evaluation"`
}

// levels is GET /api/levels with evaluate's request names as parameters.
func (s *Server) levels(w http.ResponseWriter, r *http.Request) {
	args, err := argsOfQuery("evaluate", r.URL.Query())
	if err != nil {
		s.failErr(w, r, "evaluate", err)
		return
	}
	a, err := s.runEngine(r.Context(), "evaluate", args, true)
	if err != nil {
		s.failErr(w, r, "evaluate", err)
		return
	}
	if a.Levels == nil {
		s.fail(w, r, http.StatusInternalServerError, "evaluate: no stock-level law in the answer")
		return
	}
	l := a.Levels
	writeJSON(w, http.StatusOK, levelsJSON{Of: l.Of, Min: l.Min, P: l.P, Below: l.Below, Above: l.Above, Evaluation: a.JSON})
}
