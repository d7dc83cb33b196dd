import type { Config } from 'tailwindcss';

/**
 * Nestmark's own palette and type scale. Named for what they mean on screen, so a status is
 * always paired with words and an icon and never carried by colour alone.
 */
export default {
	content: ['./src/**/*.{html,js,svelte,ts}'],
	theme: {
		extend: {
			colors: {
				// Deep pine: text, header, primary actions.
				ink: { DEFAULT: '#14312b', soft: '#3d5a53', faint: '#6f8781' },
				// Warm instrument-paper background and its panels.
				paper: { DEFAULT: '#f6f4ee', panel: '#ffffff', line: '#dcd8cc', sunk: '#ece9df' },
				// Brass: the accent of the mark, focus rings and highlights.
				brass: { DEFAULT: '#b07a1e', light: '#f3e3c2', dark: '#7d5512' },
				// Status families (always shown with a word and an icon as well).
				settled: { DEFAULT: '#1f6f4a', bg: '#dff1e6' },
				attend: { DEFAULT: '#8a5a00', bg: '#fbefd3' },
				halt: { DEFAULT: '#a3262a', bg: '#f8dedd' },
				idle: { DEFAULT: '#4d5a66', bg: '#e4e8ec' }
			},
			fontFamily: {
				sans: ['"Inter Variable"', 'system-ui', 'sans-serif'],
				mono: ['ui-monospace', '"DejaVu Sans Mono"', 'monospace']
			},
			fontSize: {
				// A compact scale, stepped by ~1.2, with large floor-page sizes at the top.
				xs: ['0.75rem', { lineHeight: '1rem' }],
				sm: ['0.875rem', { lineHeight: '1.25rem' }],
				base: ['1rem', { lineHeight: '1.5rem' }],
				lg: ['1.2rem', { lineHeight: '1.75rem' }],
				xl: ['1.44rem', { lineHeight: '2rem' }],
				'2xl': ['1.728rem', { lineHeight: '2.25rem' }],
				'3xl': ['2.074rem', { lineHeight: '2.5rem' }]
			},
			minHeight: { touch: '3rem' },
			minWidth: { touch: '3rem' }
		}
	}
} satisfies Config;
