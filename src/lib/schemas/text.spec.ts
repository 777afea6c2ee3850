import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { storable, storableJson, text, unstorablePaths } from './text';
import { isUuid } from './ids';
import { runEventInput } from './run';
import { makeJobIntake } from './job';
import { photoPatch, photoId } from '$lib/photos/api';

describe('the stored-string rule', () => {
	it('refuses NUL and lone UTF-16 surrogates, keeps every other string', () => {
		for (const bad of ['a\u0000b', '\u0000', 'x\udfff', '\ud800', 'end\ud83d', '\ude00start'])
			expect(storable(bad)).toBe(false);
		for (const good of [
			'',
			'plain',
			'emoji 😀 pair',
			'right-to-left \u202e עברית',
			'{{7*7}} ${x} <script>',
			'tab\tnew\nline'
		])
			expect(storable(good)).toBe(true);
	});

	it('answers with a message that names the field, at the field’s path', () => {
		const r = z.object({ notes: text('Notes').max(10) }).safeParse({ notes: 'a\u0000' });
		expect(r.success).toBe(false);
		expect(r.error!.issues[0].path).toEqual(['notes']);
		expect(r.error!.issues[0].message).toMatch(/^Notes contains a character that cannot be stored/);
	});

	it('is used by the step-event, job-intake and photo schemas', () => {
		const event = {
			type: 'ANSWER',
			stepId: 'power-on-as-received',
			outcome: 0,
			idempotencyKey: 'key-000001'
		};
		expect(runEventInput.safeParse(event).success).toBe(true);
		expect(runEventInput.safeParse({ ...event, notes: 'ok\u0000' }).error?.issues[0].path).toEqual(['notes']);
		expect(runEventInput.safeParse({ ...event, stepId: '\udfff' }).success).toBe(false);
		expect(runEventInput.safeParse({ ...event, idempotencyKey: 'key-\u0000-0001' }).success).toBe(false);
		expect(runEventInput.safeParse({ ...event, outcome: 'x\ud800' }).success).toBe(false);
		const intake = makeJobIntake().safeParse({ customerName: 'Ada\u0000', maker: 'M', model: 'N' });
		expect(intake.error?.issues.map((i) => i.path.join('.'))).toContain('customerName');
		expect(photoPatch.safeParse({ caption: 'lid\udfff' }).success).toBe(false);
	});

	it('walks a JSON document for a jsonb column, keys included', () => {
		expect(unstorablePaths({ a: ['ok', 'b\u0000'], ['k\udfff']: 1 })).toEqual(['a.1', 'k\udfff']);
		const schema = storableJson(z.record(z.string(), z.unknown()), 'The flow');
		const r = schema.safeParse({ steps: { s: { title: 'x\u0000' } } });
		expect(r.error?.issues[0].path).toEqual(['steps', 's', 'title']);
		expect(schema.safeParse({ steps: { s: { title: 'fine' } } }).success).toBe(true);
	});
});

describe('ids', () => {
	it('are UUIDs: 36 characters of hex and dashes are not enough', () => {
		expect(isUuid('3f2b8c1e-9a4d-4e7f-8b6a-1c2d3e4f5a6b')).toBe(true);
		for (const bad of [
			'-'.repeat(36),
			'f'.repeat(36),
			'3f2b8c1e9a4d4e7f8b6a1c2d3e4f5a6b1234',
			'x',
			'',
			'3f2b8c1e-9a4d-4e7f-8b6a-1c2d3e4f5a6\u0000'
		])
			expect(isUuid(bad)).toBe(false);
		expect(photoId.safeParse('-'.repeat(36)).success).toBe(false);
	});
});
