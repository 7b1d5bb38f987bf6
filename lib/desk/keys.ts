/**
 * The rating desk's keyboard map (Quorum's own). One table drives both the key handler and the
 * help overlay, so what the overlay shows is what the keys do.
 */
export type DeskCommand =
  | { type: 'label'; label: string }
  | { type: 'kind'; index: number }
  | { type: 'confidence'; value: number }
  | { type: 'next' }
  | { type: 'previous' }
  | { type: 'nextUnlabelled' }
  | { type: 'note' }
  | { type: 'thresholdDown' }
  | { type: 'thresholdUp' }
  | { type: 'layout' }
  | { type: 'autoAdvance' }
  | { type: 'help' }
  | { type: 'submit' }
  | { type: 'close' };

/** The key that sets each known label; other labels get their first free letter. */
const LABEL_KEYS: Record<string, string> = { signal: 's', noise: 'n', uncertain: 'u' };
const RESERVED = new Set(['j', 'k', 'e', 'l', 'a']);

export function labelKeys(labelSet: string[]): Record<string, string> {
  const used = new Set<string>();
  const out: Record<string, string> = {};
  for (const label of labelSet) {
    let key = LABEL_KEYS[label];
    if (!key || used.has(key)) key = [...label.toLowerCase()].find((c) => /[a-z]/.test(c) && !used.has(c) && !RESERVED.has(c)) ?? '';
    if (key) {
      used.add(key);
      out[label] = key;
    }
  }
  return out;
}

/** Turns a keydown into a desk command (null: not ours). Modifier keys other than Shift are left to the browser, except Ctrl/⌘+Enter. */
export function commandFor(e: Pick<KeyboardEvent, 'key' | 'code' | 'shiftKey' | 'ctrlKey' | 'metaKey' | 'altKey'>, labelSet: string[]): DeskCommand | null {
  if ((e.ctrlKey || e.metaKey) && e.key === 'Enter') return { type: 'submit' };
  if (e.ctrlKey || e.metaKey || e.altKey) return null;
  const digit = /^Digit([1-9])$/.exec(e.code)?.[1] ?? /^Numpad([1-9])$/.exec(e.code)?.[1];
  if (digit && e.shiftKey) return Number(digit) <= 5 ? { type: 'confidence', value: Number(digit) } : null;
  if (digit) return { type: 'kind', index: Number(digit) - 1 };
  switch (e.key) {
    case 'ArrowRight':
    case 'j':
      return { type: 'next' };
    case 'ArrowLeft':
    case 'k':
      return { type: 'previous' };
    case 'Enter':
      return { type: 'nextUnlabelled' };
    case 'e':
      return { type: 'note' };
    case '[':
      return { type: 'thresholdDown' };
    case ']':
      return { type: 'thresholdUp' };
    case 'l':
      return { type: 'layout' };
    case 'a':
      return { type: 'autoAdvance' };
    case '?':
      return { type: 'help' };
    case 'Escape':
      return { type: 'close' };
  }
  const keys = labelKeys(labelSet);
  const label = Object.keys(keys).find((l) => keys[l] === e.key.toLowerCase());
  return label ? { type: 'label', label } : null;
}

/** Rows of the help overlay. */
export function helpRows(labelSet: string[], noiseKinds: string[], names: { label: (k: string) => string; kind: (k: string) => string }) {
  const keys = labelKeys(labelSet);
  return [
    {
      group: 'Label',
      rows: [
        ...labelSet.filter((l) => keys[l]).map((l) => ({ keys: [keys[l].toUpperCase()], does: names.label(l) })),
        ...noiseKinds.slice(0, 9).map((k, i) => ({ keys: [String(i + 1)], does: `Noise: ${names.kind(k)}` })),
        { keys: ['Shift', '1–5'], does: 'Confidence 1 (low) to 5 (high)' },
        { keys: ['E'], does: 'Write a note (Esc leaves the note)' },
      ],
    },
    {
      group: 'Move',
      rows: [
        { keys: ['→', 'J'], does: 'Next component' },
        { keys: ['←', 'K'], does: 'Previous component' },
        { keys: ['Enter'], does: 'Next unlabelled component' },
        { keys: ['A'], does: 'Auto-advance after a label on / off' },
      ],
    },
    {
      group: 'View',
      rows: [
        { keys: ['[', ']'], does: 'Lower / raise the |z| threshold' },
        { keys: ['L'], does: 'Multiplanar ↔ mosaic' },
        { keys: ['Click'], does: 'Move the crosshair; read z and mm' },
      ],
    },
    {
      group: 'Desk',
      rows: [
        { keys: ['Ctrl', 'Enter'], does: 'Submit the run (every component labelled)' },
        { keys: ['?'], does: 'This help' },
        { keys: ['Esc'], does: 'Close help' },
      ],
    },
  ];
}
