import { readFileSync } from 'node:fs';
import dagre from '@dagrejs/dagre';
import { describe, expect, it, vi } from 'vitest';
import { checkFlow } from './check';
import { addStep, setExit, setStepField } from './edit';
import {
	createLayouter,
	layoutFlow,
	NODE_SIZE,
	patchPlacement,
	placeFlow,
	structureKey,
	type LayoutNode
} from './layout';
import { parseFlow } from './parse';
import type { FlowDefinition } from './schema';

function shipped(name: string): FlowDefinition {
	const parsed = parseFlow(
		readFileSync(new URL(`../../../flows/${name}.flow.yaml`, import.meta.url), 'utf8')
	);
	if (!parsed.ok) throw new Error(`${name} must parse`);
	return parsed.definition;
}

function must(r: { ok: true; definition: FlowDefinition } | { ok: false; message: string }) {
	if (!r.ok) throw new Error(r.message);
	return r.definition;
}

const overlap = (a: LayoutNode, b: LayoutNode) =>
	a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;

describe('layoutFlow', () => {
	const def = shipped('no-power-after-liquid');
	const layout = layoutFlow(def, checkFlow(def).problems);

	it('places one node per step, sized by kind, with no two overlapping', () => {
		expect(layout.nodes.map((n) => n.id).sort()).toEqual(Object.keys(def.steps).sort());
		for (const n of layout.nodes)
			expect([n.width, n.height]).toEqual([NODE_SIZE[n.kind].width, NODE_SIZE[n.kind].height]);
		for (let i = 0; i < layout.nodes.length; i++)
			for (let j = i + 1; j < layout.nodes.length; j++)
				expect(
					overlap(layout.nodes[i], layout.nodes[j]),
					`${layout.nodes[i].id} / ${layout.nodes[j].id}`
				).toBe(false);
		expect(layout.width).toBeGreaterThan(0);
	});

	it('draws every answer and range as a labelled arrow, pointing downwards unless it loops back', () => {
		const exits = Object.values(def.steps).reduce(
			(n, s) =>
				n +
				(s.kind === 'measure'
					? (s.ranges?.length ?? 0)
					: s.kind === 'verdict'
						? 0
						: (s.outcomes?.length ?? 0)),
			0
		);
		expect(layout.edges).toHaveLength(exits);
		for (const e of layout.edges) expect(e.label.length).toBeGreaterThan(0);
		const start = layout.nodes.find((n) => n.id === def.start)!;
		expect(start.marks).toContain('start');
		for (const n of layout.nodes) expect(n.y).toBeGreaterThanOrEqual(start.y);
		const draw = layout.edges.find((e) => e.source === 'standby-current' && e.index === 0)!;
		expect(draw.fullLabel.length).toBeGreaterThan(0);
	});

	it('marks unreachable and dead-end steps from the checker and draws a missing target as its own node', () => {
		let broken = must(addStep(def, 'test'));
		// The new test is unreachable; pointing it at itself makes it a dead end too.
		broken = must(setExit(broken, 'new-test', 0, { next: 'new-test' }));
		// A dangling next from a reachable step.
		broken = must(setExit(broken, def.start, 0, { next: 'no-such-step' }));
		const problems = checkFlow(broken).problems;
		const l = layoutFlow(broken, problems);
		const node = (id: string) => l.nodes.find((n) => n.id === id)!;
		expect(node('new-test').marks).toEqual(expect.arrayContaining(['unreachable', 'dead-end']));
		expect(node(def.start).marks).toEqual(['start', 'problem']);
		const dangling = l.edges.find((e) => e.dangling)!;
		expect(dangling).toMatchObject({ source: def.start, index: 0, target: `missing:${def.start}:0` });
		expect(node(dangling.target)).toMatchObject({
			kind: 'missing',
			title: 'No step "no-such-step"',
			marks: ['missing']
		});
	});

	it('numbers the answers of one step that lead to the same step, so their labels can take turns', () => {
		// A step whose first two answers lead to different steps (the start's all lead to one).
		const fork = 'power-on-as-received';
		const twice = must(
			setExit(def, fork, 1, {
				next: layout.edges.find((e) => e.source === fork && e.index === 0)!.target
			})
		);
		const edges = layoutFlow(twice).edges.filter((e) => e.source === fork);
		expect(edges.slice(0, 2).map((e) => [e.slot, e.slots])).toEqual([
			[0, 2],
			[1, 2]
		]);
		for (const e of layout.edges.filter((x) => x.source !== fork)) expect(e.slots).toBeGreaterThanOrEqual(1);
	});

	it('shortens long labels for the drawing and keeps the full text', () => {
		const long = must(
			setExit(def, def.start, 0, { label: 'Stays dark with no response to buttons, charger or anything' })
		);
		const e = layoutFlow(long).edges.find((x) => x.source === def.start && x.index === 0)!;
		expect(e.label).toHaveLength(28);
		expect(e.label.endsWith('…')).toBe(true);
		expect(e.fullLabel).toContain('anything');
	});
});

describe('createLayouter', () => {
	it('runs dagre again only when the structure changes', () => {
		const def = shipped('no-sound-after-liquid');
		const spy = vi.spyOn(dagre, 'layout');
		const layouter = createLayouter();
		const a = layouter(def);
		const first = Object.keys(def.steps)[0];
		const typed = must(setStepField(def, first, 'title', 'Something else entirely'));
		expect(structureKey(typed)).toBe(structureKey(def));
		const b = layouter(typed);
		expect(spy).toHaveBeenCalledTimes(1);
		expect(b.nodes.map((n) => [n.x, n.y])).toEqual(a.nodes.map((n) => [n.x, n.y]));
		expect(b.nodes.find((n) => n.id === first)?.title).toBe('Something else entirely');
		layouter(must(addStep(def, 'verdict')));
		expect(spy).toHaveBeenCalledTimes(2);
		spy.mockRestore();
	});
});

describe('patchPlacement', () => {
	const def = shipped('no-power-after-liquid');
	const before = placeFlow(def);

	it('keeps every placed node where it was when only an arrow moves', () => {
		const [a, b] = Object.keys(def.steps).filter((id) => def.steps[id].kind !== 'verdict');
		const moved = must(setExit(def, a, 0, { next: b }));
		expect(patchPlacement(before, moved)).toBe(before);
	});

	it('places a new step and a missing target near their neighbours, overlapping nothing', () => {
		let changed = must(addStep(def, 'test', def.start));
		changed = must(setExit(changed, def.start, 0, { next: 'nowhere' }));
		const patched = patchPlacement(before, changed);
		for (const [id, c] of before.centres)
			if (patched.centres.has(id)) expect(patched.centres.get(id)).toEqual(c);
		const l = layoutFlow(changed, [], patched);
		expect(l.nodes.map((n) => n.id)).toEqual(expect.arrayContaining(['new-test', `missing:${def.start}:0`]));
		for (let i = 0; i < l.nodes.length; i++)
			for (let j = i + 1; j < l.nodes.length; j++)
				expect(overlap(l.nodes[i], l.nodes[j]), `${l.nodes[i].id} / ${l.nodes[j].id}`).toBe(false);
		// The missing node hangs below the step whose answer names it.
		const start = patched.centres.get(def.start)!;
		expect(patched.centres.get(`missing:${def.start}:0`)!.y).toBeGreaterThan(start.y);
		expect(patched.width).toBeGreaterThanOrEqual(before.width);
	});

	it('lays out a whole flow from nothing with no overlaps', () => {
		const l = layoutFlow(def, [], patchPlacement({ centres: new Map(), width: 0, height: 0 }, def));
		for (let i = 0; i < l.nodes.length; i++)
			for (let j = i + 1; j < l.nodes.length; j++) expect(overlap(l.nodes[i], l.nodes[j])).toBe(false);
	});
});

describe('createLayouter with a background placer', () => {
	const def = shipped('no-power-after-liquid');

	it('never runs dagre in place for a big flow: patched positions first, the placer’s when they arrive', async () => {
		const spy = vi.spyOn(dagre, 'layout');
		let release!: () => void;
		const place = vi.fn(
			(d: FlowDefinition) =>
				new Promise<ReturnType<typeof placeFlow>>((r) => (release = () => r(placeFlow(d))))
		);
		const onPlaced = vi.fn();
		const layouter = createLayouter({ place, syncLimit: 5, onPlaced });
		const first = layouter(def);
		expect(first.provisional).toBe(true);
		expect(spy).not.toHaveBeenCalled();
		expect(place).toHaveBeenCalledTimes(1);
		// The same structure again (a keystroke in a title) does not ask twice.
		layouter(must(setStepField(def, def.start, 'title', 'Typed')));
		expect(place).toHaveBeenCalledTimes(1);
		release();
		await vi.waitFor(() => expect(onPlaced).toHaveBeenCalledTimes(1));
		const tidy = layouter(def);
		expect(tidy.provisional).toBeUndefined();
		expect(tidy.nodes).toEqual(layoutFlow(def).nodes);
		spy.mockRestore();
	});

	it('drops an answer for a structure that changed meanwhile', async () => {
		const answers: (() => void)[] = [];
		const place = (d: FlowDefinition) =>
			new Promise<ReturnType<typeof placeFlow>>((r) => answers.push(() => r(placeFlow(d))));
		const onPlaced = vi.fn();
		const layouter = createLayouter({ place, syncLimit: 5, onPlaced });
		layouter(def);
		const added = must(addStep(def, 'verdict'));
		expect(layouter(added).provisional).toBe(true);
		answers[0](); // the answer for the old structure
		await new Promise((r) => setTimeout(r, 0));
		expect(onPlaced).not.toHaveBeenCalled();
		expect(layouter(added).provisional).toBe(true);
		answers[1]();
		await vi.waitFor(() => expect(onPlaced).toHaveBeenCalledTimes(1));
		expect(layouter(added).provisional).toBeUndefined();
	});

	it('keeps the patched positions when the placer fails', async () => {
		const layouter = createLayouter({ place: () => Promise.reject(new Error('no worker')), syncLimit: 5 });
		expect(layouter(def).provisional).toBe(true);
		await new Promise((r) => setTimeout(r, 0));
		const again = layouter(def);
		expect(again.provisional).toBeUndefined();
		expect(again.nodes).toHaveLength(Object.keys(def.steps).length);
	});
});
