/** Chart colours from the product theme (tailwind.config.ts): quiet grid, light trace, faint axes. */
export const CHART = {
  grid: '#262d37',
  axis: '#6b7583',
  trace: '#c9d2de',
  reference: '#4fb8b0',
  fd: '#e59a7a',
  tick: { fill: '#9aa4b2', fontSize: 10 },
} as const;
