import fs from 'node:fs';
import { sveltekit } from '@sveltejs/kit/vite';
import tailwindcss from '@tailwindcss/vite';
import { svelteTesting } from '@testing-library/svelte/vite';
import { defineConfig } from 'vitest/config';

// `npm run dev` reads a local .env into process.env (src/lib/server/env.ts checks it at start-up).
if (!process.env.VITEST && fs.existsSync('.env')) process.loadEnvFile('.env');

export default defineConfig({
	plugins: [tailwindcss(), sveltekit()],
	optimizeDeps: { exclude: ['@electric-sql/pglite'] },
	ssr: { external: ['@electric-sql/pglite', 'sharp', '@node-rs/argon2'] },
	test: {
		expect: { requireAssertions: true },
		projects: [
			{
				extends: true,
				plugins: [svelteTesting()],
				test: {
					name: 'components',
					environment: 'jsdom',
					include: ['src/**/*.svelte.spec.ts'],
					setupFiles: ['./src/vitest-setup-client.ts']
				}
			},
			{
				extends: true,
				test: {
					name: 'server',
					environment: 'node',
					include: ['src/**/*.spec.ts', 'scripts/**/*.spec.ts'],
					exclude: ['src/**/*.svelte.spec.ts'],
					env: { DATA_DIR: 'memory://', AUTH_SECRET: 'test-secret-test-secret-test-secret-0123' },
					// Each in-memory PGlite costs about 2 s (WASM compile + initdb).
					testTimeout: 30_000,
					hookTimeout: 60_000
				}
			}
		]
	}
});
