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
}

export interface FlowLayout {
	nodes: LayoutNode[];
	edges: LayoutEdge[];
	width: number;
	height: number;
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
const labelWidth = (s: string) => Math.round(s.length * 6.5 + 16);

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

/** The expensive part: dagre over steps, "missing" nodes and labelled exits. */
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
		return {
			id,
			source: e.source,
			target,
			label: shorten(e.label),
			fullLabel: e.label,
			index: e.index,
			dangling
		};
	});
	return { nodes, edges, width: where.width, height: where.height };
}

/**
 * A layout function for the editor that runs dagre only when the structure changed (steps added,
 * removed or renamed, kinds, exits); a keystroke in a title or body reuses the last positions.
 */
export function createLayouter() {
	let key: string | null = null;
	let placement: Placement | null = null;
	return (def: FlowDefinition, problems: FlowProblem[] = []): FlowLayout => {
		const k = structureKey(def);
		if (k !== key || !placement) {
			placement = place(def, exitsOfFlow(def));
			key = k;
		}
		return layoutFlow(def, problems, placement);
	};
}
