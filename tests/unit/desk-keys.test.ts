import { describe, expect, it } from 'vitest';
import { commandFor, helpRows, keyBelongsTo, labelKeys } from '@/lib/desk/keys';

const press = (key: string, extra: Partial<KeyboardEvent> = {}) =>
  commandFor(
    {
      key,
      code: /^[0-9]$/.test(key) ? `Digit${key}` : `Key${key.toUpperCase()}`,
      shiftKey: false,
      ctrlKey: false,
      metaKey: false,
      altKey: false,
      ...extra,
    },
    ['signal', 'noise', 'uncertain'],
  );

describe('desk keys', () => {
  it('maps the viewing keys without clashing with labels, kinds or moving', () => {
    expect(press('p')).toEqual({ type: 'nextCluster' });
    expect(press('o')).toEqual({ type: 'overlay' });
    expect(press('v')).toEqual({ type: 'sign' });
    expect(press('g')).toEqual({ type: 'goTo' });
    expect(press('m')).toEqual({ type: 'plane' });
    expect(press('f')).toEqual({ type: 'flag' });
    expect(press('F', { shiftKey: true })).toEqual({ type: 'filter' });
    expect(press('0')).toEqual({ type: 'resetView' });
    expect(press('3')).toEqual({ type: 'kind', index: 2 });
    expect(press('ArrowUp')).toEqual({ type: 'slice', delta: 1 });
    expect(press('ArrowRight')).toEqual({ type: 'next' });
    expect(press('ArrowRight', { shiftKey: true })).toEqual({ type: 'pan', dx: 1, dy: 0 });
    expect(press('Home')).toEqual({ type: 'first' });
    expect(press('s')).toEqual({ type: 'label', label: 'signal' });
  });

  it('gives custom labels no letter the desk already uses', () => {
    const keys = labelKeys(['signal', 'noise', 'pulsatile', 'other', 'vascular', 'motion', 'good', 'fine']);
    for (const k of Object.values(keys)) expect(['j', 'k', 'e', 'l', 'a', 'p', 'o', 'v', 'm', 'g', 'f']).not.toContain(k);
    expect(new Set(Object.values(keys)).size).toBe(Object.values(keys).length);
  });

  it('lists no key twice in the help, and the read-only help has no voting keys', () => {
    const rows = helpRows(['signal', 'noise'], ['motion'], { label: (l) => l, kind: (k) => k }).flatMap((g) => g.rows);
    const combos = rows.map((r) => r.keys.join('+'));
    expect(new Set(combos).size).toBe(combos.length);
    const ro = helpRows([], [], { label: (l) => l, kind: (k) => k }, true);
    expect(ro.map((g) => g.group)).not.toContain('Label');
    expect(ro.flatMap((g) => g.rows).some((r) => /Flag|Submit/.test(r.does))).toBe(false);
  });
});

describe('keys that belong to the focused element (common practice, no source: text fields, lists and sliders keep their keys)', () => {
  const el = (tagName: string, extra: Record<string, unknown> = {}) =>
    ({ tagName, isContentEditable: false, ...extra }) as unknown as EventTarget;
  it('text fields, lists, sliders and editable text keep their keys', () => {
    expect(keyBelongsTo(el('TEXTAREA'))).toBe(true);
    expect(keyBelongsTo(el('SELECT'))).toBe(true);
    expect(keyBelongsTo(el('INPUT', { type: 'text' }))).toBe(true);
    expect(keyBelongsTo(el('INPUT', { type: 'range' }))).toBe(true);
    expect(keyBelongsTo(el('DIV', { isContentEditable: true }))).toBe(true);
  });
  it('on a tick box, a button or the page the desk’s keys work', () => {
    expect(keyBelongsTo(el('INPUT', { type: 'checkbox' }))).toBe(false);
    expect(keyBelongsTo(el('INPUT', { type: 'radio' }))).toBe(false);
    expect(keyBelongsTo(el('BUTTON'))).toBe(false);
    expect(keyBelongsTo(el('BODY'))).toBe(false);
    expect(keyBelongsTo(null)).toBe(false);
  });
});
