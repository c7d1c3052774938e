/**
 * Tick labels for the charts' axes of equal cells (heat maps), spaced so neighbours never overlap
 * at any width: pure functions of the measured cell size, shared by the charts and their tests.
 */

/** The charts' tick type is 11 px; a character is about 6.5 px wide in it (measured in Chromium). */
export const TICK_FONT_PX = 11;
export const TICK_CHARACTER_PX = 6.5;
/** Free space kept between neighbouring labels. */
const TICK_GAP_PX = 4;

/**
 * Every k-th key from the first, with k the fewest cells a label needs (its extent along the axis
 * plus a gap). With no measured size yet (0) every key is kept.
 *
 * Example: 13 keys, 18 px cells, 20 px labels → k = 2: keys 0, 2, 4, …, 12.
 */
export function spacedTicks<Key>(keys: readonly Key[], cellPx: number, labelPx: number): Key[] {
  if (!(cellPx > 0)) return [...keys];
  const step = Math.max(1, Math.ceil((labelPx + TICK_GAP_PX) / cellPx));
  return keys.filter((_, index) => index % step === 0);
}

/** Width of a tick label of this many characters, for spacing it along a horizontal axis. */
export function labelWidth(characters: number): number {
  return Math.ceil(characters * TICK_CHARACTER_PX);
}

/**
 * A round or step count as a short tick label: whole thousands as "k" (common practice), so the
 * regime map's columns stay narrow. Example: 10000 → "10k", 500 → "500", 2500 → "2500".
 */
export function formatCountTick(count: number): string {
  return count >= 1000 && count % 1000 === 0 ? `${count / 1000}k` : String(count);
}
