/**
 * Event-loop delay, for the load benchmark. PGlite runs every query synchronously on the main
 * thread, so the longest stall under load is the number that tells whether one slow request holds
 * up every other. Off unless TIDEMARK_DIAGNOSTICS=1; the histogram then costs one timer.
 */
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { env } from '$lib/server/env';

type IntervalHistogram = ReturnType<typeof monitorEventLoopDelay>;

const g = globalThis as unknown as { __tidemarkLoop?: IntervalHistogram };

export function diagnosticsEnabled() {
	return env().TIDEMARK_DIAGNOSTICS;
}

function histogram() {
	if (!g.__tidemarkLoop) {
		// 5 ms sampling: fine enough for a 50 ms goal, cheap enough to leave on during a bench.
		g.__tidemarkLoop = monitorEventLoopDelay({ resolution: 5 });
		g.__tidemarkLoop.enable();
	}
	return g.__tidemarkLoop;
}

export type EventLoopStats = { maxMs: number; p99Ms: number; meanMs: number; samples: number };

/** Delay seen since the last reset (the timer's own resolution is included in every figure). */
export function eventLoopStats(): EventLoopStats {
	const h = histogram();
	const ms = (ns: number) => Math.round(ns / 1e4) / 100;
	return { maxMs: ms(h.max), p99Ms: ms(h.percentile(99)), meanMs: ms(h.mean || 0), samples: h.count };
}

export function resetEventLoopStats() {
	histogram().reset();
}
