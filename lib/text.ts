/**
 * Text that can be stored: a lone UTF-16 surrogate (half of an emoji, e.g. JSON "\ud800") has no
 * UTF-8 form, and MariaDB refuses it in JSON columns such as the audit log's detail. Free-text
 * fields check with `wellFormed` so the person gets a 4xx saying what is wrong, not a 500.
 */
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

export function isWellFormedText(value: string): boolean {
  return !LONE_SURROGATE.test(value);
}

/** Zod refinement: `z.string().refine(...wellFormed('a note'))`. */
export function wellFormed(what: string): [(value: string) => boolean, { message: string }] {
  return [isWellFormedText, { message: `${what} holds a broken character (half of an emoji or symbol); retype it` }];
}

/**
 * A message part closed as one sentence: trimmed, inner runs of spaces collapsed, and a full stop
 * added only when it does not already end in ".", "?" or "!" (so "…label." + "." never reads "..").
 */
export function sentence(text: string): string {
  const t = text.replace(/ {2,}/g, ' ').trim();
  return /[.?!…]$/.test(t) ? t : `${t}.`;
}
