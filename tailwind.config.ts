import type { Config } from 'tailwindcss';

// Orrery's own palette: warm paper and ink, verdigris for "in phase",
// copper for the thing you are looking at, and a vermilion for divergence.
// Components use these names only; no raw hex values in markup.
export default {
	content: ['./src/**/*.{html,js,svelte,ts}'],
	theme: {
		extend: {
			colors: {
				paper: { DEFAULT: '#f6f1e7', deep: '#ece4d4', edge: '#d9cfbb' },
				ink: { DEFAULT: '#1d2330', soft: '#3a4254', muted: '#575d6e', faint: '#6c7283' },
				verdigris: { DEFAULT: '#2f7d6d', light: '#cfe6df', dark: '#1f5a4e' },
				copper: { DEFAULT: '#a3531f', light: '#f1dccb', dark: '#8a4720' },
				vermilion: { DEFAULT: '#c2362b', light: '#f6d6d2', dark: '#8f231b' },
				slateblue: { DEFAULT: '#46558c', light: '#dde1f0' },
				night: { DEFAULT: '#151a24', panel: '#1f2533', line: '#2d3546' }
			},
			fontFamily: {
				sans: ['"Space Grotesk Variable"', 'system-ui', 'sans-serif'],
				mono: ['"JetBrains Mono Variable"', 'ui-monospace', 'monospace']
			},
			borderRadius: { card: '0.6rem' }
		}
	}
} satisfies Config;
