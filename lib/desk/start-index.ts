/**
 * Where the desk opens: the position the rater left (1-based, saved as they move), else the first
 * component they have not labelled, else the first. The page uses it too, to fetch that component's
 * map ahead of the page's scripts.
 */
export function deskStartIndex(
  lastComponentIdx: number | null,
  components: ReadonlyArray<{ id: number }>,
  mine: ReadonlyArray<{ componentId: number }>,
): number {
  if (lastComponentIdx && lastComponentIdx >= 1 && lastComponentIdx <= components.length) return lastComponentIdx - 1;
  const labelled = new Set(mine.map((v) => v.componentId));
  const i = components.findIndex((c) => !labelled.has(c.id));
  return i < 0 ? 0 : i;
}
