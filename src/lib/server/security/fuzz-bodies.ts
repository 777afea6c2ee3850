// A valid body for every JSON route, which the fuzzer (fuzz.spec.ts) then spoils one field at a time.
// A JSON route found on disk without a sample here fails the suite.
import * as flowLibrary from '$lib/server/flows/queries';
import { FLOW, type World } from '$lib/server/testing/world';

export type Sample = { body: unknown; params?: Record<string, string> } | { skip: string };

async function draftDefinition(w: World) {
	return (await flowLibrary.getVersionById(w.draftId))!.definition;
}

export const samples: Record<string, (w: World) => Promise<Sample> | Sample> = {
	'/api/jobs POST': () => ({
		body: {
			customerName: 'Orla Fenwick',
			customerEmail: 'orla@customer.test',
			customerPhone: '+00 555 0142',
			maker: 'Corvana',
			model: 'Tern 5',
			imei: '',
			serial: 'CV-1234',
			symptoms: ['restart-loop'],
			liquid: 'fresh',
			submerged: false,
			passcodeStatus: 'withheld',
			consentToOpen: true,
			notes: 'Dropped in a sink'
		}
	}),
	'/api/jobs/[id] PATCH': (w) => ({ body: { technicianId: w.tech.id } }),
	'/api/jobs/[id]/data PUT': () => ({
		body: { outcome: 'backed-up', note: "Copied to the customer's own storage" }
	}),
	'/api/runs POST': (w) => ({ body: { jobId: w.unassignedJobId, flowId: FLOW } }),
	'/api/runs/[id]/events POST': () => ({
		body: {
			type: 'ANSWER',
			stepId: 'power-on-as-received',
			outcome: 0,
			idempotencyKey: 'fuzz-key-0001',
			notes: 'n'
		}
	}),
	'/api/runs/[id]/abandon POST': () => ({ body: { reason: 'The customer collected the phone' } }),
	'/api/photos/[id] PATCH': () => ({ body: { caption: 'Corrosion at the flex', shownToCustomer: false } }),
	'/api/flows/drafts POST': (w) => ({ body: { fromVersionId: w.versionId } }),
	'/api/flows/drafts/[draftId] PUT': async (w) => ({
		body: { revision: 1, definition: await draftDefinition(w), changelog: 'Clearer caution' }
	}),
	'/api/flows/drafts/[draftId]/[action] POST': () => ({
		body: { comment: 'Add the caution for the hot-air step' },
		params: { action: 'send-back' }
	}),
	'/(app)/flows/[id]/drafts/[draftId] PUT': async (w) => ({
		body: { revision: 1, definition: await draftDefinition(w) }
	}),
	'/api/payments/webhook POST': () => ({
		skip: 'the body is checked against the payment service signature before it is parsed (payments.spec.ts)'
	})
};
