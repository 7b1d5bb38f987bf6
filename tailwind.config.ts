import type { Config } from 'tailwindcss';

// Quorum's own theme: a calm dark ground, quiet panels, and one accent ("lumen", a cool teal).
// Label colours on the rating desk are deliberately not the accent, so the accent always means "act".
export default {
  content: ['./app/**/*.{ts,tsx}', './components/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        ground: { DEFAULT: '#0e1116', raised: '#151a21', sunken: '#0a0c10' },
        line: { DEFAULT: '#262d37', strong: '#36404d' },
        ink: { DEFAULT: '#e4e8ee', muted: '#9aa4b2', faint: '#858f9e' }, // faint still meets WCAG AA (4.5:1) on every ground
        lumen: { DEFAULT: '#4fb8b0', strong: '#6fd3ca', deep: '#2b7f79' },
        verdict: { signal: '#8fb8ff', noise: '#e59a7a', uncertain: '#c7b86b' },
        alarm: '#f07178',
      },
      fontFamily: {
        sans: ['var(--font-sans)', 'system-ui', 'sans-serif'],
        mono: ['var(--font-mono)', 'ui-monospace', 'monospace'],
      },
    },
  },
} satisfies Config;
