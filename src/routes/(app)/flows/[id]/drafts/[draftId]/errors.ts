import { FlowAuthoringError } from '$lib/server/flows/authoring';

/** HTTP status for a refusal of the lifecycle queries (see $lib/server/flows/authoring). */
export function statusOf(e: FlowAuthoringError): 400 | 403 | 404 | 409 {
	switch (e.code) {
		case 'not-found':
			return 404;
		case 'forbidden':
			return 403;
		case 'conflict':
		case 'state':
			return 409;
		default:
			return 400;
	}
}

export { FlowAuthoringError };
