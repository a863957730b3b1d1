package main

import (
	"context"
	"errors"
	"fmt"
	"net"
	"os"
	"os/signal"
	"strings"
	"syscall"

	"calcdoc/cmd/internal/preview"
)

func init() {
	commands["watch"] = (*cli).watch
}

// watch serves a live preview of the documents until SIGINT or SIGTERM.
// Exit status: 0 after a clean shutdown, 2 for a usage error (bad flag,
// missing PATH, bad -o or --addr), 3 when it cannot listen or watch.
func (c *cli) watch(args []string) int {
	fs := c.flagSet("watch")
	addr := fs.String("addr", preview.DefaultAddr, "HOST:PORT to serve the preview on; an address other than loopback shows the sheets to the network")
	out := fs.String("o", "", "also write each sheet on every save: into this folder, or into this .html file for one document")
	var allow hostList
	fs.Var(&allow, "allow-host", "a host name (or address) requests may name besides localhost and the loopback addresses; repeat for more (the --addr host is allowed when it is not loopback)")
	paths, err := parseFlags(fs, args)
	if err != nil {
		return exitUsage
	}
	if len(paths) == 0 {
		return c.usageErr("watch needs at least one PATH")
	}
	if _, _, err := net.SplitHostPort(*addr); err != nil {
		return c.usageErr("--addr %s: %v (give HOST:PORT, such as %s)", *addr, err, preview.DefaultAddr)
	}
	ln, err := net.Listen("tcp", *addr)
	if err != nil {
		fmt.Fprintf(c.stderr, "calcdoc: cannot serve on %s: %v\n", *addr, err)
		return exitError
	}
	public := !preview.IsLoopback(ln.Addr())
	if public {
		host, _, _ := net.SplitHostPort(*addr)
		allow = append(allow, host)
	}
	w, err := preview.New(preview.Config{
		Paths:      paths,
		Out:        *out,
		Version:    version,
		Built:      sheetOptions,
		Log:        c.stdout,
		AllowHosts: allow,
		// a long-lived process: collect between saves (gc.go's setting
		// besides; docs/watch.md, "Latency")
		CollectWhenIdle: !userGC(),
	})
	if err != nil {
		ln.Close()
		var ce *preview.ConfigError
		if errors.As(err, &ce) {
			return c.usageErr("%v", err)
		}
		fmt.Fprintf(c.stderr, "calcdoc: %v\n", err)
		return exitError
	}
	if public {
		fmt.Fprintf(c.stderr, "calcdoc: warning: %s is not a loopback address: anyone who can reach this machine on the network can read these sheets. "+
			"Requests are answered only for localhost, the loopback addresses and %s, so that a web page cannot read the sheets by pointing a name of its own at this machine (DNS rebinding); "+
			"give the name others use to reach it with --allow-host NAME\n", ln.Addr(), strings.Join(allow, ", "))
	}
	fmt.Fprintf(c.stdout, "serving the preview at http://%s/ (stop with Ctrl-C)\n", ln.Addr())
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	if err := preview.Serve(ctx, ln, w); err != nil {
		fmt.Fprintf(c.stderr, "calcdoc: %v\n", err)
		return exitError
	}
	fmt.Fprintln(c.stdout, "stopped")
	return exitOK
}

// hostList is a repeatable flag of host names.
type hostList []string

func (h *hostList) String() string { return strings.Join(*h, ",") }

func (h *hostList) Set(v string) error {
	v = strings.TrimSpace(v)
	if v == "" || strings.ContainsAny(v, "/ \t") {
		return fmt.Errorf("give a host name or address, such as sheets.example or 192.168.1.20, not %q", v)
	}
	*h = append(*h, v)
	return nil
}
