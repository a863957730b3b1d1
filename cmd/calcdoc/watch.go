package main

import (
	"context"
	"errors"
	"fmt"
	"net"
	"os"
	"os/signal"
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
	w, err := preview.New(preview.Config{
		Paths:   paths,
		Out:     *out,
		Version: version,
		Built:   sheetOptions,
		Log:     c.stdout,
		AnyHost: public,
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
		fmt.Fprintf(c.stderr, "calcdoc: warning: %s is not a loopback address: anyone who can reach this machine on the network can read these sheets\n", ln.Addr())
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
