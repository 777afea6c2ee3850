import { defineConfig } from '@playwright/test';

const port = Number(process.env.E2E_PORT ?? 4173);
const origin = `http://localhost:${port}`;

export default defineConfig({
	testDir: 'tests/e2e',
	timeout: 60_000,
	expect: { timeout: 10_000 },
	fullyParallel: false,
	workers: 1, // one server process owns the data folder
	reporter: process.env.PLAYWRIGHT_JSON_OUTPUT_NAME ? [['list'], ['json']] : [['list']],
	use: {
		baseURL: origin,
		browserName: 'chromium',
		screenshot: 'only-on-failure',
		launchOptions: {
			// Debian's package; a browser download is impossible on this network.
			executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
			args: [
				'--no-sandbox',
				'--disable-gpu',
				'--disable-quic',
				'--no-first-run',
				'--disable-background-networking',
				'--disable-component-update',
				'--disable-sync'
			]
		}
	},
	webServer: {
		command: 'node build',
		url: `${origin}/api/health`,
		reuseExistingServer: false,
		gracefulShutdown: { signal: 'SIGTERM', timeout: 10_000 }, // PGlite must close cleanly
		timeout: 90_000,
		stdout: 'ignore',
		stderr: 'pipe',
		env: {
			PORT: String(port),
			ORIGIN: origin,
			DATA_DIR: process.env.E2E_DATA_DIR ?? '.e2e-data',
			AUTH_SECRET: 'e2e-secret-e2e-secret-e2e-secret-0123456789',
			TIDEMARK_DEMO: '1',
			TIDEMARK_FAKES: '1', // local mail and payment services (src/lib/server/fakes)
			DEMO_PASSWORD: 'e2e-demo-password',
			BODY_SIZE_LIMIT: '20M', // as under `npm start`: room for a 15 MB photo upload (src/lib/photos/limits.ts)
			// A small invented run history for tests/e2e/insights.spec.ts (src/lib/server/startup-tasks.ts).
			TIDEMARK_DEMO_HISTORY: '300',
			BACKUP_SCHEDULE: 'off' // no scheduled backup in the middle of a journey
		}
	}
});
