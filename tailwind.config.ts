import type { Config } from 'tailwindcss';

/**
 * Tidemark's design tokens. Raw palettes (ink, tide, copper, paper, bench) are fixed values;
 * the semantic colours (surface, text, line, accent…) point at CSS variables that app.css sets
 * for the light "paper" theme and the dark "bench" theme, so components never branch on theme.
 */
const v = (name: string) => `rgb(var(--tm-${name}) / <alpha-value>)`;

export default {
	content: ['./src/**/*.{html,svelte,svx,ts,js}'],
	theme: {
		extend: {
			colors: {
				ink: {
					50: '#eef2f4',
					100: '#d5dee3',
					300: '#8ba0ab',
					500: '#4a6270',
					700: '#243844',
					900: '#14232b',
					950: '#0b151a'
				},
				tide: {
					50: '#ebf6f3',
					100: '#cfe9e3',
					300: '#7cc4b7',
					500: '#3f9c8f',
					600: '#2f8075',
					700: '#24665d',
					900: '#123a35'
				},
				copper: {
					50: '#fbf1ea',
					100: '#f3dccb',
					300: '#e0a17a',
					500: '#c9794a',
					600: '#a85f34',
					700: '#84482a'
				},
				paper: { 50: '#fdfbf7', 100: '#f7f3ea', 200: '#ede7da', 300: '#ddd5c4' },
				bench: { 700: '#25302c', 800: '#18201d', 900: '#101614', 950: '#0a0e0d' },
				surface: v('surface'),
				raised: v('raised'),
				sunken: v('sunken'),
				text: v('text'),
				muted: v('muted'),
				line: v('line'),
				accent: v('accent'),
				'accent-text': v('accent-text'),
				'on-accent': v('on-accent'),
				highlight: v('highlight'),
				caution: v('caution'),
				'caution-bg': v('caution-bg'),
				danger: v('danger'),
				'danger-bg': v('danger-bg'),
				ok: v('ok'),
				'ok-bg': v('ok-bg'),
				'ink-text': v('text')
			},
			fontFamily: {
				sans: ['"IBM Plex Sans"', 'system-ui', 'sans-serif'],
				mono: ['"IBM Plex Mono"', 'ui-monospace', 'monospace']
			},
			// A short scale: 14 / 16 / 20 / 28 / 36 px.
			fontSize: {
				sm: ['0.875rem', { lineHeight: '1.35rem' }],
				base: ['1rem', { lineHeight: '1.5rem' }],
				lg: ['1.25rem', { lineHeight: '1.75rem' }],
				xl: ['1.75rem', { lineHeight: '2.2rem' }],
				'2xl': ['2.25rem', { lineHeight: '2.6rem' }]
			},
			minHeight: { touch: '44px' },
			minWidth: { touch: '44px' },
			borderRadius: { card: '0.75rem' }
		}
	}
} satisfies Config;
