package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net"
	"net/http"
	"os"
	"os/signal"
	"strings"
	"syscall"
	"time"

	"github.com/bowline/bowline/internal/cli"
	"github.com/bowline/bowline/internal/serve"
)

func init() {
	register("serve", "HTTP endpoint that encodes with a loaded spec", runServe)
}

// Signals and serve: main installs the SIGINT/SIGTERM handler; serve puts
// a function in signalHook so that the first of those signals starts a
// graceful shutdown (requests in flight finish, for at most
// --shutdown-timeout) instead of ending the process. main's handler takes
// only one signal, so a second SIGINT while shutting down is ignored: the
// timeout bounds the wait. SIGHUP is serve's own: it reloads the spec.
func runServe(args []string, stdout, stderr io.Writer) error {
	c := newCommand("serve", "--spec SPEC [--addr 127.0.0.1:8080] [flags]",
		"Answers HTTP requests that encode documents with a frozen spec:\n"+
			"POST /v1/encode, GET /v1/spec, GET /healthz, GET /metrics.\n"+
			"SIGHUP reloads the spec file (a spec that fails to load leaves the old one in force);\n"+
			"SIGTERM or SIGINT stop taking requests and finish those in flight.")
	var specPath, addr, logLevel string
	var maxBody int64
	var maxDocs int
	t := serve.DefaultTimeouts
	var grace time.Duration
	c.InputFlag(&specPath, "spec", "", "spec file written by bowline learn")
	c.Flags.StringVar(&addr, "addr", "127.0.0.1:8080", "address to listen on; the default answers this machine only")
	c.Flags.Int64Var(&maxBody, "max-body", serve.DefaultMaxBody, "largest request body, in bytes")
	c.Flags.IntVar(&maxDocs, "max-docs", serve.DefaultMaxDocuments, "most documents in one request")
	c.Flags.DurationVar(&t.Read, "read-timeout", t.Read, "longest time to read one request")
	c.Flags.DurationVar(&t.Write, "write-timeout", t.Write, "longest time from a request's headers to the end of its answer")
	c.Flags.DurationVar(&t.Idle, "idle-timeout", t.Idle, "longest wait for the next request on an open connection")
	c.Flags.DurationVar(&grace, "shutdown-timeout", 30*time.Second, "longest wait for requests in flight when stopping")
	c.Flags.StringVar(&logLevel, "log-level", "info", "log level debug|info|warn|error (debug logs every request)")
	if err := c.parse(args); err != nil {
		return err
	}
	if specPath == "" {
		return cli.Usagef("bowline serve needs --spec SPEC, written by bowline learn")
	}
	if len(c.Args) != 0 {
		return cli.Usagef("bowline serve takes no file arguments (got %s); give the spec with --spec", strings.Join(c.Args, " "))
	}
	if maxBody < 1 {
		return cli.Usagef("--max-body: %d is not a positive number of bytes", maxBody)
	}
	if maxDocs < 1 {
		return cli.Usagef("--max-docs: %d is not a positive number", maxDocs)
	}
	for name, d := range map[string]time.Duration{"read-timeout": t.Read, "write-timeout": t.Write, "idle-timeout": t.Idle, "shutdown-timeout": grace} {
		if d <= 0 {
			return cli.Usagef("--%s: %v is not a positive duration", name, d)
		}
	}
	var level slog.Level
	if err := level.UnmarshalText([]byte(logLevel)); err != nil {
		return cli.Usagef("--log-level: %q is not one of debug, info, warn, error", logLevel)
	}
	log := slog.New(slog.NewJSONHandler(stderr, &slog.HandlerOptions{Level: level}))

	h, err := serve.Open(specPath, serve.Options{MaxBody: maxBody, MaxDocuments: maxDocs, Logger: log})
	if err != nil {
		return err
	}
	ln, err := net.Listen("tcp", addr)
	if err != nil {
		// The address cannot be used (in use, not this machine's, not
		// allowed): choosing another is the fix, so it is the command
		// line's (exit 2), as a malformed address is.
		return cli.Usagef("--addr %s: %v", addr, err)
	}
	if !isLoopback(ln.Addr()) {
		log.Warn("listening beyond this machine: anyone who can reach the address can use the encoder", "addr", ln.Addr().String())
	}
	srv := serve.NewServer(addr, h, t, log)

	// Signals first, so none is missed once the server answers.
	stop := make(chan os.Signal, 1)
	hook := func(s os.Signal) {
		select {
		case stop <- s:
		default:
		}
	}
	signalHook.Store(&hook)
	defer signalHook.Store(nil)
	hup := make(chan os.Signal, 1)
	signal.Notify(hup, syscall.SIGHUP)
	defer signal.Stop(hup)

	served := make(chan error, 1)
	go func() { served <- srv.Serve(ln) }()
	enc := h.Encoder()
	log.Info("listening", "addr", ln.Addr().String(), "spec", enc.Fingerprint(), "mode", enc.Spec().Content.Mode,
		"columns", enc.Columns(), "fields", enc.Fields(), "max_body", maxBody, "max_docs", maxDocs, "pid", os.Getpid())
	for {
		select {
		case <-hup:
			log.Info("SIGHUP: reloading the spec", "path", specPath)
			h.Reload(specPath) // logs its own outcome
		case err := <-served:
			if errors.Is(err, http.ErrServerClosed) {
				return nil
			}
			return err
		case s := <-stop:
			log.Info("shutting down: no new requests, finishing those in flight", "signal", s.String(), "timeout", grace.String())
			ctx, cancel := context.WithTimeout(context.Background(), grace)
			err := srv.Shutdown(ctx)
			cancel()
			if err != nil {
				srv.Close()
				log.Error("shutdown timed out; connections closed", "error", err.Error())
				return fmt.Errorf("shutdown: %w", err)
			}
			log.Info("stopped")
			return nil
		}
	}
}

// isLoopback reports whether a listening address answers this machine only.
func isLoopback(a net.Addr) bool {
	ta, ok := a.(*net.TCPAddr)
	return ok && ta.IP.IsLoopback()
}
