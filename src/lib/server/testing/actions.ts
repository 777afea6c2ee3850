// Posts to a form action in process, as a browser form would, and reads its answer: a failure's
// status and data, or 200 and what the action returned. For the specs of pages with superforms.
import { isActionFailure } from '@sveltejs/kit';
import { makeEvent, type EventInit } from './events';

/** A superform as an action answers it. */
export type SpecForm = {
	id: string;
	valid: boolean;
	data: Record<string, unknown>;
	errors: Record<string, string[] | undefined> & { _errors?: string[] };
	message?: string;
};

export type ActionAnswer<Extra = object> = { status: number; form: SpecForm } & Extra;

export async function postAction<Extra = object>(
	action: unknown,
	pathname: string,
	fields: Record<string, string>,
	init: Omit<EventInit, 'method' | 'body'> = {}
): Promise<ActionAnswer<Extra>> {
	const body = new FormData();
	for (const [k, v] of Object.entries(fields)) body.set(k, v);
	const event = makeEvent(pathname, { ...init, method: 'POST', body });
	const out = await (action as (e: unknown) => Promise<unknown>)(event);
	return (
		isActionFailure(out)
			? { status: out.status, ...(out.data as unknown as object) }
			: { status: 200, ...(out as object) }
	) as ActionAnswer<Extra>;
}
