package main

import (
	"bufio"
	"errors"
	"io"
	"log/slog"
	"net"
	"net/http"
	"strings"
	"testing"
	"time"
)

// TestServeTimeouts: serve's http.Server sets every timeout (read-header,
// read, write, idle), the header one the shortest; and a client that
// sends its headers slowly is cut off at the read-header timeout while a
// normal request on another connection is answered. The timeouts are
// shortened for the test; the deadlines below are bounds on waiting, not
// timed assertions.
func TestServeTimeouts(t *testing.T) {
	d := defaultTimeouts
	hs := newHTTPServer(http.NotFoundHandler(), slog.New(slog.DiscardHandler), d)
	if hs.ReadHeaderTimeout <= 0 || hs.ReadTimeout <= 0 || hs.WriteTimeout <= 0 || hs.IdleTimeout <= 0 || hs.MaxHeaderBytes <= 0 {
		t.Fatalf("timeouts %v %v %v %v, max header %d: want every one set", hs.ReadHeaderTimeout, hs.ReadTimeout, hs.WriteTimeout, hs.IdleTimeout, hs.MaxHeaderBytes)
	}
	if hs.ReadHeaderTimeout > hs.ReadTimeout {
		t.Errorf("read-header timeout %v above the read timeout %v", hs.ReadHeaderTimeout, hs.ReadTimeout)
	}

	h := http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) { io.WriteString(w, "ok\n") })
	short := serveTimeouts{readHeader: 200 * time.Millisecond, read: time.Second, write: time.Second, idle: time.Second}
	srv := newHTTPServer(h, slog.New(slog.DiscardHandler), short)
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	errc := make(chan error, 1)
	go func() { errc <- srv.Serve(ln) }()
	t.Cleanup(func() {
		srv.Close()
		if err := <-errc; !errors.Is(err, http.ErrServerClosed) {
			t.Errorf("serve: %v", err)
		}
	})

	slow, err := net.Dial("tcp", ln.Addr().String())
	if err != nil {
		t.Fatal(err)
	}
	defer slow.Close()
	if _, err := io.WriteString(slow, "GET /healthz HTTP/1.1\r\nHost: x\r\n"); err != nil {
		t.Fatal(err)
	}
	// A normal request meanwhile is answered.
	resp, err := http.Get("http://" + ln.Addr().String() + "/")
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	if resp.StatusCode != http.StatusOK {
		t.Errorf("normal request: %d", resp.StatusCode)
	}
	// The slow client never finishes its headers: the server closes the
	// connection (reading returns EOF or a reset), it does not wait.
	if err := slow.SetReadDeadline(time.Now().Add(30 * time.Second)); err != nil { // elapsed
		t.Fatal(err)
	}
	line, err := bufio.NewReader(slow).ReadString('\n')
	var ne net.Error
	if errors.As(err, &ne) && ne.Timeout() {
		t.Fatalf("the server kept a slow-header connection open for 30 s")
	}
	if err == nil && !strings.Contains(line, "408") {
		t.Errorf("slow-header client got %q, want the connection closed (or 408)", line)
	}
}
