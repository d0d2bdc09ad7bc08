import type { Config } from 'tailwindcss'

// Our own palette: shellac brown, beeswax amber, paper, and a deep horn-green for actions.
export default {
  content: ['./app/**/*.{vue,ts}', './shared/**/*.ts', './content/**/*.md'],
  theme: {
    extend: {
      colors: {
        paper: { DEFAULT: '#fbf7ef', deep: '#f3ead8' },
        shellac: { 50: '#f7f1ea', 100: '#eadbc9', 300: '#c7a27d', 500: '#8a5a34', 700: '#5b3920', 900: '#2e1d10' },
        wax: { 100: '#fdf0cf', 300: '#f5cd6b', 500: '#d9a21b', 700: '#8d6407' },
        horn: { 100: '#dcefe7', 300: '#7fbfa4', 500: '#2f7d62', 700: '#1d5a45', 900: '#0f3327' },
        signal: { ok: '#22663f', warn: '#8a5a00', bad: '#a1261b' },
      },
      fontFamily: {
        display: ['Fraunces', 'Georgia', 'serif'],
        sans: ['"IBM Plex Sans"', 'system-ui', 'sans-serif'],
      },
      fontSize: {
        title: ['2.25rem', { lineHeight: '2.6rem', fontWeight: '700' }],
        heading: ['1.5rem', { lineHeight: '2rem', fontWeight: '600' }],
      },
    },
  },
  plugins: [],
} satisfies Config
