import { building } from '$app/environment';
import type { ServerInit } from '@sveltejs/kit';
import { sequence } from '@sveltejs/kit/hooks';
import { authHandle } from '$lib/server/auth';
import { DataDirInUseError } from '$lib/server/db/lock';
import { EnvError } from '$lib/server/env';
import { headersHandle } from '$lib/server/hooks/headers';
import { paramsHandle } from '$lib/server/hooks/params';
import { userHandle } from '$lib/server/hooks/user';
import { shutdown, startup } from '$lib/server/startup';
import { config as zodConfig } from 'zod/v4/core';

// As in hooks.client.ts: no `new Function` fast path, so the server and the browser validate alike.
zodConfig({ jitless: true });

export const init: ServerInit = async () => {
	if (building) return;
	try {
		await startup();
	} catch (e) {
		if (e instanceof EnvError || e instanceof DataDirInUseError) {
			console.error(e.message);
			process.exit(1);
		}
		throw e;
	}
	// adapter-node emits this after SIGINT/SIGTERM once the HTTP server has drained: stop the
	// background work first, then close the database.
	process.once('sveltekit:shutdown' as NodeJS.Signals, () => void shutdown());
};

export const handle = sequence(authHandle, userHandle, paramsHandle, headersHandle);
