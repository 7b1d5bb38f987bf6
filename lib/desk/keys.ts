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
  | { type: 'close' }
  | { type: 'first' }
  | { type: 'last' }
  | { type: 'goTo' }
  | { type: 'nextCluster' }
  | { type: 'overlay' }
  | { type: 'underlay' }
  | { type: 'sign' }
  | { type: 'opacityDown' }
  | { type: 'opacityUp' }
  | { type: 'zoomIn' }
  | { type: 'zoomOut' }
  | { type: 'resetView' }
  | { type: 'slice'; delta: number }
  | { type: 'pan'; dx: number; dy: number }
  | { type: 'plane' }
  | { type: 'flag' }
  | { type: 'filter' };

/** The key that sets each known label; other labels get their first free letter. */
const LABEL_KEYS: Record<string, string> = { signal: 's', noise: 'n', uncertain: 'u' };
const RESERVED = new Set(['j', 'k', 'e', 'l', 'a', 'p', 'o', 'v', 'm', 'g', 'f', 'b']);

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
export function commandFor(
  e: Pick<KeyboardEvent, 'key' | 'code' | 'shiftKey' | 'ctrlKey' | 'metaKey' | 'altKey'>,
  labelSet: string[],
): DeskCommand | null {
  if ((e.ctrlKey || e.metaKey) && e.key === 'Enter') return { type: 'submit' };
  if (e.ctrlKey || e.metaKey || e.altKey) return null;
  const digit = /^Digit([1-9])$/.exec(e.code)?.[1] ?? /^Numpad([1-9])$/.exec(e.code)?.[1];
  if (digit && e.shiftKey) return Number(digit) <= 5 ? { type: 'confidence', value: Number(digit) } : null;
  if (digit) return { type: 'kind', index: Number(digit) - 1 };
  if (e.shiftKey && e.key.startsWith('Arrow')) {
    const d = { ArrowLeft: [-1, 0], ArrowRight: [1, 0], ArrowUp: [0, 1], ArrowDown: [0, -1] }[e.key];
    return d ? { type: 'pan', dx: d[0], dy: d[1] } : null;
  }
  switch (e.key) {
    case 'Home':
      return { type: 'first' };
    case 'End':
      return { type: 'last' };
    case 'g':
      return { type: 'goTo' };
    case 'p':
      return { type: 'nextCluster' };
    case 'o':
      return { type: 'overlay' };
    case 'b':
      return { type: 'underlay' };
    case 'v':
      return { type: 'sign' };
    case '{':
      return { type: 'opacityDown' };
    case '}':
      return { type: 'opacityUp' };
    case '=':
    case '+':
      return { type: 'zoomIn' };
    case '-':
      return { type: 'zoomOut' };
    case '0':
      return { type: 'resetView' };
    case 'ArrowUp':
    case 'PageUp':
      return { type: 'slice', delta: 1 };
    case 'ArrowDown':
    case 'PageDown':
      return { type: 'slice', delta: -1 };
    case 'm':
      return { type: 'plane' };
    case 'f':
      return { type: 'flag' };
    case 'F':
      return { type: 'filter' };
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
export function helpRows(
  labelSet: string[],
  noiseKinds: string[],
  names: { label: (k: string) => string; kind: (k: string) => string },
  readOnly = false,
) {
  const keys = labelKeys(labelSet);
  const rows = [
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
        { keys: ['Home', 'End'], does: 'First / last component' },
        { keys: ['G', 'number'], does: 'Go to component N (Enter)' },
        { keys: ['F'], does: 'Flag the component to come back to' },
        { keys: ['Shift', 'F'], does: 'Strip: all → unlabelled → flagged' },
        { keys: ['A'], does: 'Auto-advance after a label on / off' },
      ],
    },
    {
      group: 'View',
      rows: [
        { keys: ['[', ']'], does: 'Lower / raise the |z| threshold' },
        { keys: ['P'], does: 'Crosshair to the next cluster peak' },
        { keys: ['↑', '↓'], does: 'Slice up / down in the large plane' },
        { keys: ['M'], does: 'Large plane: axial → coronal → sagittal' },
        { keys: ['+', '−', '0'], does: 'Zoom in / out / reset' },
        { keys: ['Shift', 'arrows'], does: 'Pan (or drag with the right button)' },
        { keys: ['O'], does: 'Map on / off' },
        { keys: ['B'], does: 'Underlay: mean image ↔ structural (when attached)' },
        { keys: ['{', '}'], does: 'Map opacity down / up' },
        { keys: ['V'], does: 'Both signs → positive → negative' },
        { keys: ['L'], does: 'Three planes ↔ mosaic' },
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
  if (!readOnly) return rows;
  // the read-only run view: viewing and moving only
  const viewing = new Set(['Label', 'Desk']);
  const noVoting = /Flag|Strip|Auto-advance|Next unlabelled/;
  return [
    ...rows.filter((g) => !viewing.has(g.group)).map((g) => ({ ...g, rows: g.rows.filter((r) => !noVoting.test(r.does)) })),
    { group: 'Help', rows: [{ keys: ['?'], does: 'This help (Esc closes)' }] },
  ];
}

/** Input types whose keys the desk leaves alone only for their own keys (Space toggles them): the desk's keys work there. */
const KEYLESS_INPUTS = new Set(['checkbox', 'radio', 'button', 'submit', 'reset']);

/**
 * True when a key pressed on `target` belongs to it: text fields, lists, sliders (arrow keys move
 * them) and editable text. The desk's keys then do nothing, so a rater typing a note or moving the
 * threshold never switches components; on a ticked box or a button they work as anywhere else.
 */
export function keyBelongsTo(target: EventTarget | null): boolean {
  if (!target || typeof (target as HTMLElement).tagName !== 'string') return false;
  const el = target as HTMLElement;
  if (el.isContentEditable || el.tagName === 'TEXTAREA' || el.tagName === 'SELECT') return true;
  return el.tagName === 'INPUT' && !KEYLESS_INPUTS.has((el as HTMLInputElement).type);
}
