import { describe, expect, it } from 'vitest';
import { runAbandonInput, runEventInput } from './run';

describe('runEventInput', () => {
	const key = '6f1c2b8e-3d4a-4f5b-9c6d-7e8f9a0b1c2d';

	it('accepts the three event shapes the run screen sends', () => {
		expect(
			runEventInput.parse({ type: 'ANSWER', stepId: 's', outcome: 0, idempotencyKey: key })
		).toMatchObject({
			outcome: 0
		});
		expect(runEventInput.parse({ type: 'MEASURE', stepId: 's', value: 0.05, idempotencyKey: key }).type).toBe(
			'MEASURE'
		);
		expect(
			runEventInput.parse({ type: 'BACK', stepId: 's', idempotencyKey: key, notes: 'revised' }).notes
		).toBe('revised');
	});

	it('requires an idempotency key, a step id and a number for a reading, with plain messages', () => {
		const noKey = runEventInput.safeParse({ type: 'ANSWER', stepId: 's', outcome: 0 });
		expect(noKey.success).toBe(false);
		expect(noKey.error!.issues[0].path).toEqual(['idempotencyKey']);
		const shortKey = runEventInput.safeParse({ type: 'BACK', stepId: 's', idempotencyKey: 'abc' });
		expect(shortKey.error!.issues[0].message).toMatch(/at least 8 characters/);
		const text = runEventInput.safeParse({
			type: 'MEASURE',
			stepId: 's',
			value: '0.05',
			idempotencyKey: key
		});
		expect(text.error!.issues[0].message).toBe('Enter the reading as a number.');
		expect(runEventInput.safeParse({ type: 'JUMP', stepId: 's', idempotencyKey: key }).success).toBe(false);
		expect(
			runEventInput.safeParse({ type: 'ANSWER', stepId: '', outcome: 1, idempotencyKey: key }).success
		).toBe(false);
	});

	it('asks for a reason of a few words to abandon a run', () => {
		expect(runAbandonInput.safeParse({ reason: '  ' }).error!.issues[0].message).toMatch(/why the run stops/);
		expect(runAbandonInput.parse({ reason: ' Customer took it back ' }).reason).toBe('Customer took it back');
	});
});
