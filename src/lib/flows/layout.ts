// Over 300 lines on purpose: one algorithm, the editor graph's layout.
/**
 * layoutFlow: positions for the editor's graph, drawn top to bottom by dagre. Nodes are steps
 * (sized by kind), edges are answers and ranges with their labels; a `next` that names no step
 * gets a small "missing" node of its own so the mistake is visible where it is. Steps the checker
 * found unreachable or dead-ended carry those marks. Pure; no DOM, so it runs in node and tests.
 */
import dagre from '@dagrejs/dagre';
import type { FlowProblem } from './problems';
import { describeRange } from './ranges';
import type { FlowDefinition, StepKind } from './schema';

export type NodeKind = StepKind | 'missing';
export type StepMark = 'start' | 'unreachable' | 'dead-end' | 'problem' | 'missing';

export interface LayoutNode {
	id: string;
	kind: NodeKind;
	title: string;
	/** Top-left corner, as @xyflow/svelte places nodes. */
	x: number;
	y: number;
	width: number;
	height: number;
	marks: StepMark[];
	/** Number of problems the checker reported on this step. */
	problems: number;
}

export interface LayoutEdge {
	id: string;
	source: string;
	target: string;
	/** Shortened for the drawing; `fullLabel` has the whole text. */
	label: string;
	fullLabel: string;
	/** Position of the answer or range in its step. */
	index: number;
	dangling: boolean;
	/** Answers of one step leading to the same step share a path: this one's place among them. */
	slot: number;
	slots: number;
}

export interface FlowLayout {
	nodes: LayoutNode[];
	edges: LayoutEdge[];
	width: number;
	height: number;
	/** True while the positions are patched and dagre's are still being computed elsewhere. */
	provisional?: boolean;
}

export const NODE_SIZE: Record<NodeKind, { width: number; height: number }> = {
	symptom: { width: 240, height: 76 },
	test: { width: 240, height: 76 },
	measure: { width: 240, height: 84 },
	verdict: { width: 260, height: 80 },
	missing: { width: 200, height: 56 }
};

const MAX_LABEL = 28;
const shorten = (s: string) => (s.length > MAX_LABEL ? `${s.slice(0, MAX_LABEL - 1)}…` : s);
// IBM Plex Sans at 12 px averages about 6.5 px per character (measured in the browser, rounded up).
/** The width an arrow's label takes on the graph, padding included. */
export const labelWidth = (s: string) => Math.round(s.length * 6.5 + 16);

/** Marks per step from the checker's problems. */
export function marksFrom(problems: FlowProblem[]): Map<string, { marks: Set<StepMark>; count: number }> {
	const out = new Map<string, { marks: Set<StepMark>; count: number }>();
	for (const p of problems) {
		if (!p.step) continue;
		const entry = out.get(p.step) ?? { marks: new Set<StepMark>(), count: 0 };
		entry.count++;
		entry.marks.add(
			p.code === 'unreachable-step' ? 'unreachable' : p.code === 'dead-end' ? 'dead-end' : 'problem'
		);
		out.set(p.step, entry);
	}
	return out;
}

interface Exit {
	source: string;
	next: string;
	label: string;
	index: number;
}

function exitsOfFlow(def: FlowDefinition): Exit[] {
	const out: Exit[] = [];
	for (const [source, step] of Object.entries(def.steps)) {
		if (step.kind === 'measure')
			(step.ranges ?? []).forEach((r, index) =>
				out.push({ source, next: r.next, label: r.label ?? describeRange(r, step.unit), index })
			);
		else if (step.kind !== 'verdict')
			(step.outcomes ?? []).forEach((o, index) =>
				out.push({ source, next: o.next, label: o.label ?? '', index })
			);
	}
	return out;
}

/**
 * What the positions depend on: step ids and kinds (node sizes), exits and their shortened labels.
 * Titles, bodies, cautions and problems do not move anything, so typing in them needs no new layout.
 */
export function structureKey(def: FlowDefinition): string {
	const parts: string[] = [];
	for (const [id, step] of Object.entries(def.steps)) parts.push(`${id}\u0001${step.kind}`);
	parts.push('\u0002');
	for (const e of exitsOfFlow(def)) parts.push(`${e.source}\u0001${e.next}\u0001${shorten(e.label)}`);
	return parts.join('\u0003');
}

export interface Placement {
	centres: Map<string, { x: number; y: number }>;
	width: number;
	height: number;
}

const missingId = (e: Exit) => `missing:${e.source}:${e.index}`;

/**
 * The expensive part: dagre over steps, "missing" nodes and labelled exits. Its cost grows with the
 * sum of the arrows' lengths in ranks (dagre threads a dummy node through every rank an arrow
 * crosses, twice over because it keeps a rank free for labels): about 4 s for the 300-step bench
 * flow, whose verdicts are reached from all along the flow. The editor runs it in a worker for big
 * flows (see createLayouter).
 */
export function placeFlow(def: FlowDefinition): Placement {
	return place(def, exitsOfFlow(def));
}

function place(def: FlowDefinition, exits: Exit[]): Placement {
	const g = new dagre.graphlib.Graph({ multigraph: true });
	g.setGraph({ rankdir: 'TB', nodesep: 36, ranksep: 56, edgesep: 12, marginx: 16, marginy: 16 });
	g.setDefaultEdgeLabel(() => ({}));
	for (const [id, step] of Object.entries(def.steps))
		g.setNode(id, { ...(NODE_SIZE[step.kind] ?? NODE_SIZE.test) });
	for (const e of exits) {
		let target = e.next;
		if (!Object.hasOwn(def.steps, target)) {
			target = missingId(e);
			g.setNode(target, { ...NODE_SIZE.missing });
		}
		const short = shorten(e.label);
		g.setEdge(
			e.source,
			target,
			{ width: labelWidth(short), height: 20, labelpos: 'c' },
			`${e.source}:${e.index}`
		);
	}
	dagre.layout(g);
	const centres = new Map<string, { x: number; y: number }>();
	for (const id of g.nodes()) {
		const n = g.node(id);
		centres.set(id, { x: n.x ?? 0, y: n.y ?? 0 });
	}
	const graph = g.graph();
	return { centres, width: graph.width ?? 0, height: graph.height ?? 0 };
}

/** Lays out a flow; `placement` lets a caller reuse positions computed for the same structure. */
export function layoutFlow(
	def: FlowDefinition,
	problems: FlowProblem[] = [],
	placement?: Placement
): FlowLayout {
	const exits = exitsOfFlow(def);
	const where = placement ?? place(def, exits);
	const marks = marksFrom(problems);
	const nodes: LayoutNode[] = [];
	const put = (node: Omit<LayoutNode, 'x' | 'y'>) => {
		const c = where.centres.get(node.id) ?? { x: 0, y: 0 };
		nodes.push({ ...node, x: c.x - node.width / 2, y: c.y - node.height / 2 });
	};
	for (const [id, step] of Object.entries(def.steps)) {
		const m = marks.get(id);
		put({
			id,
			kind: step.kind,
			title: step.title,
			...(NODE_SIZE[step.kind] ?? NODE_SIZE.test),
			marks: [...(def.start === id ? ['start' as const] : []), ...(m?.marks ?? [])],
			problems: m?.count ?? 0
		});
	}
	const targetOf = (e: Exit) => (Object.hasOwn(def.steps, e.next) ? e.next : missingId(e));
	const shared = new Map<string, number>();
	for (const e of exits) {
		const pair = `${e.source}>${targetOf(e)}`;
		shared.set(pair, (shared.get(pair) ?? 0) + 1);
	}
	const taken = new Map<string, number>();
	const edges: LayoutEdge[] = exits.map((e) => {
		const dangling = !Object.hasOwn(def.steps, e.next);
		const target = dangling ? missingId(e) : e.next;
		if (dangling)
			put({
				id: target,
				kind: 'missing',
				title: e.next ? `No step "${e.next}"` : 'Next step not chosen',
				...NODE_SIZE.missing,
				marks: ['missing'],
				problems: 0
			});
		const id = `${e.source}:${e.index}`;
		const pair = `${e.source}>${target}`;
		taken.set(pair, (taken.get(pair) ?? -1) + 1);
		return {
			id,
			source: e.source,
			target,
			label: shorten(e.label),
			fullLabel: e.label,
			index: e.index,
			dangling,
			slot: taken.get(pair) ?? 0,
			slots: shared.get(pair) ?? 1
		};
	});
	return { nodes, edges, width: where.width, height: where.height };
}

/** The size of every node a definition draws: its steps and one "missing" node per dangling exit. */
function nodeSizes(def: FlowDefinition, exits: Exit[]) {
	const sizes = new Map<string, { width: number; height: number }>();
	for (const [id, step] of Object.entries(def.steps)) sizes.set(id, NODE_SIZE[step.kind] ?? NODE_SIZE.test);
	for (const e of exits) if (!Object.hasOwn(def.steps, e.next)) sizes.set(missingId(e), NODE_SIZE.missing);
	return sizes;
}

const GAP_X = 36;
const GAP_Y = 64;

/**
 * Positions for a changed structure without dagre, in time linear in the flow: every node that was
 * placed before keeps its place (arrows are drawn between nodes by the graph component, so a
 * re-pointed answer needs nothing new); a new node goes below the step that points to it (or above
 * the step it points to, or below everything), moved right until it overlaps nothing. Good enough
 * to keep drawing while dagre tidies up in the background.
 */
export function patchPlacement(prev: Placement, def: FlowDefinition): Placement {
	const exits = exitsOfFlow(def);
	const sizes = nodeSizes(def, exits);
	const centres = new Map<string, { x: number; y: number }>();
	const fresh: string[] = [];
	for (const id of sizes.keys()) {
		const c = prev.centres.get(id);
		if (c) centres.set(id, c);
		else fresh.push(id);
	}
	if (fresh.length === 0 && centres.size === prev.centres.size) return prev;
	const from = new Map<string, string>();
	const to = new Map<string, string>();
	for (const e of exits) {
		const target = Object.hasOwn(def.steps, e.next) ? e.next : missingId(e);
		if (!from.has(target) && e.source !== target) from.set(target, e.source);
		if (!to.has(e.source) && e.source !== target) to.set(e.source, target);
	}
	let bottom = 0;
	for (const [id, c] of centres) bottom = Math.max(bottom, c.y + (sizes.get(id)?.height ?? 0) / 2);
	const boxes = [...centres].map(([id, c]) => ({ ...c, ...sizes.get(id)! }));
	const free = (x: number, y: number, w: number, h: number) =>
		!boxes.some(
			(b) =>
				Math.abs(b.x - x) < (b.width + w) / 2 + GAP_X / 2 &&
				Math.abs(b.y - y) < (b.height + h) / 2 + GAP_Y / 2
		);
	for (const id of fresh) {
		const size = sizes.get(id)!;
		const above = from.get(id);
		const below = to.get(id);
		let x: number, y: number;
		const a = above && centres.get(above);
		const b = below && centres.get(below);
		if (a) [x, y] = [a.x, a.y + (sizes.get(above!)!.height + size.height) / 2 + GAP_Y];
		else if (b) [x, y] = [b.x, b.y - (sizes.get(below!)!.height + size.height) / 2 - GAP_Y];
		else [x, y] = [size.width / 2 + 16, bottom + GAP_Y + size.height / 2];
		while (!free(x, y, size.width, size.height)) x += size.width + GAP_X;
		centres.set(id, { x, y });
		boxes.push({ x, y, ...size });
		bottom = Math.max(bottom, y + size.height / 2);
	}
	let width = 0;
	let height = 0;
	for (const b of boxes) {
		width = Math.max(width, b.x + b.width / 2 + 16);
		height = Math.max(height, b.y + b.height / 2 + 16);
	}
	return { centres, width, height };
}

export interface LayouterOptions {
	/**
	 * Runs dagre elsewhere (the editor: a web worker). When given, a flow of more than `syncLimit`
	 * steps is never laid out by dagre on the caller's thread: a structural change gets patched
	 * positions at once (patchPlacement), and dagre's positions replace them when `place` answers.
	 */
	place?: (def: FlowDefinition) => Promise<Placement>;
	/** Steps up to which dagre runs in place anyway (quick enough: under 40 ms for 30 steps, see bench/editor.bench.ts). */
	syncLimit?: number;
	/** Called when positions from `place` arrived; lay out again to draw them. */
	onPlaced?: () => void;
}

/**
 * A layout function for the editor. Dagre runs only when the structure changed (steps added,
 * removed or renamed, kinds, exits); a keystroke in a title or body reuses the last positions.
 * With `place`, a big flow's structural change is patched at once and tidied in the background.
 */
export function createLayouter(options: LayouterOptions = {}) {
	const syncLimit = options.syncLimit ?? 30;
	let key: string | null = null;
	let placement: Placement | null = null;
	let wanted: string | null = null;

	function tidy(def: FlowDefinition, k: string) {
		wanted = k;
		options.place!(def).then(
			(placed) => {
				if (wanted !== k) return; // the structure changed again: a newer request is on its way
				placement = placed;
				key = k;
				wanted = null;
				options.onPlaced?.();
			},
			() => {
				if (wanted !== k) return;
				// No background layout to be had (no workers, or it failed): keep the patched positions.
				key = k;
				wanted = null;
				options.onPlaced?.();
			}
		);
	}

	return (def: FlowDefinition, problems: FlowProblem[] = []): FlowLayout => {
		const k = structureKey(def);
		if (k !== key || !placement) {
			const big = options.place && Object.keys(def.steps).length > syncLimit;
			if (!big) {
				placement = place(def, exitsOfFlow(def));
				key = k;
				wanted = null;
			} else if (wanted !== k) {
				placement = patchPlacement(placement ?? { centres: new Map(), width: 0, height: 0 }, def);
				tidy(def, k);
			}
		}
		const out = layoutFlow(def, problems, placement!);
		return wanted === null ? out : { ...out, provisional: true };
	};
}

/** Structured-clone-safe form of a placement, for a worker's messages. */
export type PlacementMessage = {
	centres: [string, { x: number; y: number }][];
	width: number;
	height: number;
};
export const toMessage = (p: Placement): PlacementMessage => ({ ...p, centres: [...p.centres] });
export const fromMessage = (m: PlacementMessage): Placement => ({ ...m, centres: new Map(m.centres) });
