/**
 * The step graph of a flow as integer adjacency lists, and the linear-time walks the checker
 * needs (reachability, topological order, shortest and longest routes).
 */
import { exitsOf, type FlowDefinition, type Step } from './schema';

export interface FlowGraph {
	ids: string[];
	steps: Step[];
	index: Map<string, number>;
	/** Targets of each step's exits; -1 where a `next` names no step. */
	out: number[][];
	/** -1 when `start` names no step. */
	start: number;
}

export function buildGraph(def: FlowDefinition): FlowGraph {
	const ids = Object.keys(def.steps);
	const steps = ids.map((id) => def.steps[id]);
	const index = new Map(ids.map((id, i) => [id, i]));
	const out = steps.map((s) => exitsOf(s).map((next) => index.get(next) ?? -1));
	return { ids, steps, index, out, start: index.get(def.start) ?? -1 };
}

function reverse(g: FlowGraph): number[][] {
	const into: number[][] = g.ids.map(() => []);
	g.out.forEach((targets, u) => {
		for (const v of targets) if (v >= 0) into[v].push(u);
	});
	return into;
}

function flood(adjacency: number[][], seeds: Iterable<number>): Uint8Array {
	const seen = new Uint8Array(adjacency.length);
	const stack: number[] = [];
	for (const s of seeds) {
		if (s >= 0 && !seen[s]) {
			seen[s] = 1;
			stack.push(s);
		}
	}
	while (stack.length) {
		for (const v of adjacency[stack.pop()!]) {
			if (v >= 0 && !seen[v]) {
				seen[v] = 1;
				stack.push(v);
			}
		}
	}
	return seen;
}

/** Steps reachable from `start` (1) or not (0). */
export const reachable = (g: FlowGraph) => flood(g.out, g.start >= 0 ? [g.start] : []);

/** Steps from which some seed can be reached. */
export const reaching = (g: FlowGraph, seeds: number[]) => flood(reverse(g), seeds);

/** Topological order of the reached steps, or null when they contain a loop (Kahn). */
export function topologicalOrder(g: FlowGraph, reached: Uint8Array): number[] | null {
	const indegree = new Int32Array(g.ids.length);
	let count = 0;
	g.out.forEach((targets, u) => {
		if (!reached[u]) return;
		count++;
		for (const v of targets) if (v >= 0) indegree[v]++;
	});
	const order: number[] = [];
	for (let u = 0; u < g.ids.length; u++) if (reached[u] && indegree[u] === 0) order.push(u);
	for (let k = 0; k < order.length; k++) {
		for (const v of g.out[order[k]]) if (v >= 0 && --indegree[v] === 0) order.push(v);
	}
	return order.length === count ? order : null;
}

const minutesOf = (s: Step) => (s.kind === 'verdict' ? 0 : (s.minutes ?? 0));

/** Fewest steps from start to every step (BFS); Infinity where unreachable. */
export function fewestSteps(g: FlowGraph): Float64Array {
	const dist = new Float64Array(g.ids.length).fill(Infinity);
	if (g.start < 0) return dist;
	dist[g.start] = 0;
	const queue = [g.start];
	for (let k = 0; k < queue.length; k++) {
		const u = queue[k];
		for (const v of g.out[u]) {
			if (v >= 0 && dist[v] === Infinity) {
				dist[v] = dist[u] + 1;
				queue.push(v);
			}
		}
	}
	return dist;
}

/** Fewest minutes from start to reaching every step (Dijkstra, binary heap). */
export function fewestMinutes(g: FlowGraph): Float64Array {
	const dist = new Float64Array(g.ids.length).fill(Infinity);
	if (g.start < 0) return dist;
	const heap = new MinHeap();
	dist[g.start] = 0;
	heap.push(0, g.start);
	while (heap.size) {
		const [d, u] = heap.pop();
		if (d > dist[u]) continue;
		const nd = d + minutesOf(g.steps[u]);
		for (const v of g.out[u]) {
			if (v >= 0 && nd < dist[v]) {
				dist[v] = nd;
				heap.push(nd, v);
			}
		}
	}
	return dist;
}

/** Most steps and most minutes from start to every step, along a topological order. */
export function longestRoutes(g: FlowGraph, order: number[]): { steps: Float64Array; minutes: Float64Array } {
	const steps = new Float64Array(g.ids.length).fill(-Infinity);
	const minutes = new Float64Array(g.ids.length).fill(-Infinity);
	steps[g.start] = 0;
	minutes[g.start] = 0;
	for (const u of order) {
		if (steps[u] === -Infinity) continue;
		const m = minutesOf(g.steps[u]);
		for (const v of g.out[u]) {
			if (v < 0) continue;
			steps[v] = Math.max(steps[v], steps[u] + 1);
			minutes[v] = Math.max(minutes[v], minutes[u] + m);
		}
	}
	return { steps, minutes };
}

class MinHeap {
	private keys: number[] = [];
	private values: number[] = [];
	get size() {
		return this.keys.length;
	}
	push(key: number, value: number) {
		const { keys, values } = this;
		let i = keys.length;
		keys.push(key);
		values.push(value);
		while (i > 0) {
			const parent = (i - 1) >> 1;
			if (keys[parent] <= key) break;
			keys[i] = keys[parent];
			values[i] = values[parent];
			i = parent;
		}
		keys[i] = key;
		values[i] = value;
	}
	pop(): [number, number] {
		const { keys, values } = this;
		const top: [number, number] = [keys[0], values[0]];
		const lastKey = keys.pop()!;
		const lastValue = values.pop()!;
		const n = keys.length;
		if (n) {
			let i = 0;
			for (;;) {
				let child = 2 * i + 1;
				if (child >= n) break;
				if (child + 1 < n && keys[child + 1] < keys[child]) child++;
				if (keys[child] >= lastKey) break;
				keys[i] = keys[child];
				values[i] = values[child];
				i = child;
			}
			keys[i] = lastKey;
			values[i] = lastValue;
		}
		return top;
	}
}
