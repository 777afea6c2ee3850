/**
 * For command-line scripts that use the app's server code. That code relies on Vite features ($lib,
 * import.meta.glob), so it is loaded through Vite's SSR module loader rather than imported directly.
 * The loaded code reads its settings through src/lib/server/env.ts, so a script sets process.env
 * (e.g. DATA_DIR) before loading it. `runWithServerModules` starts the loader, runs the task, closes the loader
 * and exits with the task's code (1 after an unexpected error, which is printed).
 */
import { createServer } from 'vite';

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- modules loaded at run time
export type LoadModule = (path: string) => Promise<Record<string, any>>;

/** The message when PGlite's data folder is open in the app: the error class comes from Vite's module graph, so it is matched by name. */
export function dataDirInUse(e: unknown): string | null {
	return e instanceof Error && e.constructor.name === 'DataDirInUseError'
		? `${e.message}\nStop the app (Ctrl+C in its terminal), then run this again.`
		: null;
}

export async function runWithServerModules(task: (load: LoadModule) => Promise<number>): Promise<never> {
	const vite = await createServer({
		appType: 'custom',
		logLevel: 'error',
		server: { middlewareMode: true, hmr: false, ws: false, watch: null }
	});
	let code = 0;
	try {
		code = await task((path) => vite.ssrLoadModule(path));
	} catch (e) {
		console.error(e);
		code = 1;
	} finally {
		await vite.close();
	}
	process.exit(code);
}
