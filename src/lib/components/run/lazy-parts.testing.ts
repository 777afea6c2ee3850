/**
 * The run screen loads its photo, past-run and held-entry parts with `import()` once a step is on
 * screen. A component spec that renders it loads them first, so that no import is still pending
 * when the test's environment is torn down (vitest reports that as an error of the run).
 */
export const loadLazyParts = () =>
	Promise.all([
		import('$lib/components/RunStepPhotos.svelte'),
		import('./PastRuns.svelte'),
		import('./HeldEntries.svelte')
	]);
