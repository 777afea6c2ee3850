import adapter from '@sveltejs/adapter-node';
import { vitePreprocess } from '@sveltejs/vite-plugin-svelte';
import { mdsvex } from 'mdsvex';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const pkg = JSON.parse(readFileSync(new URL('./package.json', import.meta.url), 'utf8'));

/** @type {import('@sveltejs/kit').Config} */
export default {
	extensions: ['.svelte', '.svx'],
	preprocess: [
		vitePreprocess(),
		mdsvex({
			extensions: ['.svx'],
			// Absolute: mdsvex emits the layout as an import inside every .svx file.
			layout: { _: fileURLToPath(new URL('./src/lib/components/DocLayout.svelte', import.meta.url)) },
			// The default ('legacy') emits $$props, which runes-mode pages reject.
			layoutPropForwarding: 'runes'
		})
	],
	compilerOptions: {
		// mdsvex 0.12 emits <script context="module"> for frontmatter; harmless under Svelte 5.
		warningFilter: (w) => !(w.code === 'script_context_deprecated' && w.filename?.endsWith('.svx'))
	},
	kit: {
		adapter: adapter(),
		version: { name: pkg.version },
		csp: {
			mode: 'auto',
			directives: {
				'default-src': ['self'],
				'script-src': ['self'],
				'style-src': ['self', 'unsafe-inline'],
				'img-src': ['self', 'data:', 'blob:'],
				'font-src': ['self'],
				'connect-src': ['self'],
				'frame-ancestors': ['none'],
				'form-action': ['self'],
				'base-uri': ['self'],
				'object-src': ['none']
			}
		}
	}
};
