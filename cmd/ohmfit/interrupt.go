package main

import (
	"context"
	"os"
	"os/signal"
	"sync/atomic"
	"time"

	"github.com/ohmfit/ohmfit/synth"
)

// searchInterrupt gives Ctrl-C its meaning around a search. While the
// search runs, an interrupt cancels the returned context: the search stops
// and the best found so far is shown, marked not proven. Once searched is
// called, an interrupt ends the process at once, as it would by default
// (removing any temporary output first): what follows a search (worst-case
// checks, Monte Carlo, re-ranking) has no partial result worth showing,
// and a swallowed Ctrl-C would leave the user waiting. release stops
// catching the signal.
func searchInterrupt() (ctx context.Context, searched, release func()) {
	ctx, cancel := context.WithCancel(context.Background())
	ch := make(chan os.Signal, 1)
	signal.Notify(ch, os.Interrupt)
	var after atomic.Bool
	stopped := make(chan struct{})
	go func() {
		for {
			select {
			case sig := <-ch:
				if after.Load() {
					endBySignal(sig)
				}
				cancel()
			case <-stopped:
				return
			}
		}
	}()
	release = func() {
		signal.Stop(ch)
		select {
		case <-stopped:
		default:
			close(stopped)
		}
		cancel()
	}
	return ctx, func() { after.Store(true); phase("searched") }, release
}

// phaseHook, when set, is told as a run enters each long phase:
// "searching" once the search has finished its first row or box,
// "searched" when it is over, "checking" as a real-parts check begins.
// Only tests set it, to send a signal in a known phase.
var phaseHook func(name string)

// phase tells phaseHook, if any, that the run entered a phase.
func phase(name string) {
	if phaseHook != nil {
		phaseHook(name)
	}
}

// watchSearch tells phaseHook once the search has made progress. It does
// nothing without a hook.
func watchSearch(ctx context.Context, pr *synth.Progress) {
	if phaseHook == nil || pr == nil {
		return
	}
	go func() {
		for ctx.Err() == nil {
			if done, _ := pr.Counts(); done > 0 {
				phase("searching")
				return
			}
			time.Sleep(time.Millisecond)
		}
	}()
}
