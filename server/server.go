// Package server is Pulsewright's workbench server: the REST API, the
// websocket sessions that re-evaluate a scenario on every edit, the chart
// options built with go-echarts, and the embedded page.
//
// Routes are listed in routes.go; the websocket protocol is in
// protocol.go and DEVELOPERS.md.
package server

import (
	"context"
	"crypto/rand"
	"encoding/base64"
	"errors"
	"fmt"
	"io/fs"
	"log/slog"
	"net"
	"net/http"
	"net/netip"
	"os"
	"runtime"
	"sync"
	"sync/atomic"
	"time"

	"github.com/gorilla/websocket"

	"github.com/pulsewright/pulsewright/scenarios"
	"github.com/pulsewright/pulsewright/web"
)

// Evaluator turns a valid scenario into a report and its plot series. It
// must return promptly with ctx.Err() once ctx is cancelled.
type Evaluator func(ctx context.Context, s *scenarios.Scenario) (*scenarios.Result, error)

// MinTokenLen is the shortest access token accepted in Config.Token.
const MinTokenLen = 16

// DefaultAddr is the workbench's address unless told otherwise.
const DefaultAddr = "127.0.0.1:8750"

// Config configures a Server. Zero fields take the defaults noted.
type Config struct {
	Addr    string // host:port to listen on; default DefaultAddr; port 0 picks a free one
	DataDir string // directory of saved scenarios; required
	Token   string // access token; generated when the address is not loopback and Token is empty
	// AllowedHosts are host names, besides localhost, IP literals and the
	// bound host, that requests may name in their Host header (a name the
	// server is reached by on a team network). Any other Host gets 421.
	AllowedHosts []string
	Dev          bool  // serve the page from web/static on disk instead of the embedded copy
	Static       fs.FS // the page's files; overrides Dev and the embedded copy (tests)
	MaxSessions  int   // open websocket sessions at most; default 64
	// MaxSessionsPerClient bounds the sessions of one remote address;
	// default 16.
	MaxSessionsPerClient int
	// SessionTimeout closes a session that has sent no message for this
	// long (pings do not count); default 30 minutes. When the server or a
	// client is at its cap, a new session instead closes the one idle
	// longest, if it has been idle for EvictAfter (default 1 minute).
	SessionTimeout time.Duration
	EvictAfter     time.Duration
	APITimeout     time.Duration // deadline of a REST request; default 30 s
	// EvalTimeout is the deadline of one evaluation, REST or websocket;
	// default 30 s.
	EvalTimeout time.Duration
	// BodyTimeout bounds the time to receive a request's body, from the
	// handler's start; a slower body gets 408. Default 20 s.
	BodyTimeout time.Duration
	// MemoryLimit is the memory budget, in bytes, of the evaluations in
	// flight, REST and websocket together, counted by their estimated cost
	// (scenarios.EstimateCost). One over it is refused at once with 422;
	// others wait for room until their deadline. Default: half the
	// machine's memory, at most 4 GiB.
	MemoryLimit int64
	// SessionIdle is how long a websocket session may go without a client
	// message before it drops its evaluation buffers (they are rebuilt on
	// the next message); default 2 minutes.
	SessionIdle time.Duration
	// StarveAfter bounds how long new edits may keep cancelling a
	// session's computation in flight (see session.cancelBefore); default
	// 50 ms.
	StarveAfter time.Duration
	StartDemo   string // the demo the page opens on; default scenarios.DefaultDemo
	// SessionEvaluator, when set, makes each websocket session its own
	// evaluator for the edited scenario, one that may keep state from edit
	// to edit (a scenarios.Engine). It is used by one goroutine at a time.
	SessionEvaluator func() Evaluator
}

// Server is the workbench's HTTP server.
type Server struct {
	cfg    Config
	log    *slog.Logger
	eval   Evaluator
	store  *scenarios.Store
	static fs.FS
	token  string
	hosts  map[string]struct{} // host names accepted besides IP literals and localhost
	up     websocket.Upgrader
	ambs   chartCache // ambiguity charts by waveform
	waves  chartCache // the designer's charts by waveform and receiver
	adm    *admission // compute slots and memory budget, shared by REST and sessions

	ctx    context.Context // cancelled by Close: ends the sessions
	cancel context.CancelFunc

	mu         sync.Mutex // guards live, closing and the Add of sessions
	live       map[*sessionSlot]struct{}
	closing    bool
	sessions   sync.WaitGroup
	sessionIDs atomic.Uint64 // numbers sessions in logs

	ln  net.Listener
	srv *http.Server
}

// New checks cfg, opens the store of saved scenarios and returns a server
// that is not yet listening.
func New(cfg Config, log *slog.Logger, eval Evaluator) (*Server, error) {
	if log == nil || eval == nil {
		return nil, errors.New("server: nil logger or evaluator")
	}
	if cfg.Addr == "" {
		cfg.Addr = DefaultAddr
	}
	if cfg.StarveAfter <= 0 {
		cfg.StarveAfter = starveAfter
	}
	if cfg.MaxSessions <= 0 {
		cfg.MaxSessions = 64
	}
	if cfg.MaxSessionsPerClient <= 0 {
		cfg.MaxSessionsPerClient = 16
	}
	if cfg.SessionTimeout <= 0 {
		cfg.SessionTimeout = 30 * time.Minute
	}
	if cfg.EvictAfter <= 0 {
		cfg.EvictAfter = time.Minute
	}
	if cfg.APITimeout <= 0 {
		cfg.APITimeout = 30 * time.Second
	}
	if cfg.BodyTimeout <= 0 {
		cfg.BodyTimeout = bodyTimeout
	}
	if cfg.EvalTimeout <= 0 {
		cfg.EvalTimeout = 30 * time.Second
	}
	if cfg.MemoryLimit <= 0 {
		cfg.MemoryLimit = defaultMemoryLimit()
	}
	if cfg.SessionIdle <= 0 {
		cfg.SessionIdle = 2 * time.Minute
	}
	if cfg.StartDemo == "" {
		cfg.StartDemo = scenarios.DefaultDemo
	}
	if _, err := scenarios.LoadDemo(cfg.StartDemo); err != nil {
		return nil, fmt.Errorf("start demo: %w", err)
	}
	host, _, err := net.SplitHostPort(cfg.Addr)
	if err != nil {
		return nil, fmt.Errorf("address %q: %w", cfg.Addr, err)
	}
	if n := len(cfg.Token); n > 0 && n < MinTokenLen {
		return nil, fmt.Errorf("access token of %d characters is too easy to guess: use at least %d, or none to have one generated", n, MinTokenLen)
	}
	hosts, err := allowedHosts(host, cfg.AllowedHosts)
	if err != nil {
		return nil, err
	}
	store, err := scenarios.OpenStore(cfg.DataDir)
	if err != nil {
		return nil, err
	}
	if err := store.CheckWritable(); err != nil {
		log.Warn("saved scenarios cannot be written: saves and deletes will fail", "err", err)
	}
	// Sessions compute at most one per processor at a time: the rest wait
	// blocked, so readers and writers stay responsive and edits coalesce
	// in the mailboxes rather than in socket buffers.
	s := &Server{cfg: cfg, log: log, eval: eval, store: store, token: cfg.Token, hosts: hosts, live: map[*sessionSlot]struct{}{}, adm: newAdmission(runtime.GOMAXPROCS(0), cfg.MemoryLimit)}
	if s.token == "" && !isLoopback(host) {
		b := make([]byte, 24)
		rand.Read(b)
		s.token = base64.RawURLEncoding.EncodeToString(b)
	}
	switch {
	case cfg.Static != nil:
		s.static = cfg.Static
	case cfg.Dev:
		s.static = os.DirFS("web/static")
	default:
		s.static = web.FS()
	}
	// The default CheckOrigin stays: a browser page from another origin
	// cannot open a session.
	s.up = websocket.Upgrader{ReadBufferSize: 4096, WriteBufferSize: 16384, EnableCompression: false}
	s.ctx, s.cancel = context.WithCancel(context.Background())
	return s, nil
}

// isLoopback reports whether host names only this machine.
func isLoopback(host string) bool {
	if host == "localhost" {
		return true
	}
	ip, err := netip.ParseAddr(host)
	return err == nil && ip.IsLoopback()
}

// Token returns the access token, empty when none is needed.
func (s *Server) Token() string { return s.token }

// Open listens on the configured address and serves in the background.
// Errors such as a port in use are returned at once.
func (s *Server) Open() error {
	ln, err := net.Listen("tcp", s.cfg.Addr)
	if err != nil {
		return fmt.Errorf("listen: %w", err)
	}
	s.ln = ln
	s.srv = &http.Server{
		Handler: s.Handler(),
		// Time to read a request's headers: guards against slow clients.
		ReadHeaderTimeout: 5 * time.Second,
		// Time to read a whole request, body included (4 MiB at most).
		ReadTimeout: 30 * time.Second,
		// Time to write a response; longer than APITimeout so that a
		// timed-out handler can still answer. Websocket sessions set their
		// own deadlines after the upgrade.
		WriteTimeout: s.cfg.APITimeout + 10*time.Second,
		// Time an idle keep-alive connection stays open.
		IdleTimeout: 2 * time.Minute,
		// Handlers see a context that Close cancels.
		BaseContext: func(net.Listener) context.Context { return s.ctx },
		ErrorLog:    slog.NewLogLogger(s.log.Handler(), slog.LevelWarn),
	}
	go func() {
		if err := s.srv.Serve(ln); err != nil && !errors.Is(err, http.ErrServerClosed) {
			s.log.Error("serve", "err", err)
		}
	}()
	s.log.Info("listening", "addr", ln.Addr().String(), "data_dir", s.store.Dir(), "token", s.token != "")
	return nil
}

// Addr returns the address listened on, after Open.
func (s *Server) Addr() net.Addr { return s.ln.Addr() }

// URL returns the page's URL, with the token when one is needed. An
// unspecified listening address (0.0.0.0) is shown as 127.0.0.1.
func (s *Server) URL() string {
	addr := s.ln.Addr().(*net.TCPAddr)
	host := addr.IP.String()
	if addr.IP.IsUnspecified() {
		host = "127.0.0.1"
	}
	u := "http://" + net.JoinHostPort(host, fmt.Sprint(addr.Port)) + "/"
	if s.token != "" {
		u += "?token=" + s.token
	}
	return u
}

// Close stops the server: it ends the websocket sessions (which Shutdown
// does not track), lets requests in flight, saves included, finish, and
// waits for both until ctx is done.
func (s *Server) Close(ctx context.Context) error {
	s.mu.Lock()
	s.closing = true
	s.mu.Unlock()
	s.cancel()
	var err error
	if s.srv != nil {
		err = s.srv.Shutdown(ctx)
	}
	done := make(chan struct{})
	go func() { s.sessions.Wait(); close(done) }()
	select {
	case <-done:
	case <-ctx.Done():
		return fmt.Errorf("close: sessions still open: %w", ctx.Err())
	}
	return err
}
