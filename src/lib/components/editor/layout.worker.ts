/// <reference lib="webworker" />
/**
 * Dagre off the page's thread: a big flow's layout takes seconds, and typing must not wait for it.
 * Message in: { id, definition }; out: { id, placement } or { id, error }.
 */
import { placeFlow, toMessage } from '$lib/flows/layout';
import type { FlowDefinition } from '$lib/flows/schema';

self.onmessage = (e: MessageEvent<{ id: number; definition: FlowDefinition }>) => {
	const { id, definition } = e.data;
	try {
		self.postMessage({ id, placement: toMessage(placeFlow(definition)) });
	} catch (err) {
		self.postMessage({ id, error: err instanceof Error ? err.message : String(err) });
	}
};
