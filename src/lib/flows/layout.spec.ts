import { readFileSync } from 'node:fs';
import dagre from '@dagrejs/dagre';
import { describe, expect, it, vi } from 'vitest';
import { checkFlow } from './check';
import { addStep, setExit, setStepField } from './edit';
import { createLayouter, layoutFlow, NODE_SIZE, structureKey, type LayoutNode } from './layout';
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
