package main

import (
	"context"
	"os"
	"os/signal"
	"syscall"
)

// signalContext returns a context that the first Ctrl-C (SIGINT) or
// SIGTERM cancels, so that the command stops at its next check (between
// blocks, between files) and cleans up its temporaries. After the first
// signal the handler is released: a second one ends the process at once,
// as Go does by default. Call stop when the command returns.
func signalContext() (ctx context.Context, stop func()) {
	ctx, stop = signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	go func() {
		<-ctx.Done()
		stop()
	}()
	return ctx, stop
}
