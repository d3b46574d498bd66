// Where a field's help bubble goes: next to the field, where it covers none of the page's
// other controls if it can, and none of the field's own form wherever some place allows it
// (the user types with the neighbouring fields in view). Plain boxes in document
// coordinates: the page measures them (HelpBubble.svelte), tests give them directly.

/** A box in document coordinates (CSS pixels). */
export interface Box {
  left: number;
  top: number;
  right: number;
  bottom: number;
}

/** A control the bubble might cover; `near`: one of the field's own form. */
export interface Control {
  box: Box;
  near: boolean;
}

/** Gap between the field and the bubble, and the bubble's least distance from the window's edges. */
export const GAP = 4;
export const MARGIN = 8;

/** Whether two boxes overlap (sharing only an edge is not overlapping). */
export const overlaps = (a: Box, b: Box): boolean => a.left < b.right && b.left < a.right && a.top < b.bottom && b.top < a.bottom;

/** Whether key a sorts before key b (compared value by value). */
function before(a: readonly number[], b: readonly number[]): boolean {
  for (let k = 0; k < a.length; k++) if (a[k] !== b[k]) return a[k] < b[k];
  return false;
}

/**
 * The bubble's top left corner. Places tried, in this order: under the field (from its left
 * edge, then ending at its right edge), above it (the same two), to its right, to its left,
 * then under, above, right of and left of each of `groups` (the boxes around the field,
 * innermost first: its fieldset, its form). Of the places within the window's width, the
 * one chosen covers the fewest controls of the field's form; of those, it is wholly inside
 * the window where one is, covers no other control where one does, and comes first in that
 * order.
 */
export function placeBubble(field: Box, size: { width: number; height: number }, visible: Box, controls: readonly Control[], groups: readonly Box[] = []): { left: number; top: number } {
  const { width, height } = size;
  const x = (left: number) => Math.max(visible.left + MARGIN, Math.min(left, visible.right - width - MARGIN));
  const besideTop = Math.max(visible.top + MARGIN, Math.min(field.top, visible.bottom - height - MARGIN));
  const places: Array<{ left: number; top: number }> = [
    { left: x(field.left), top: field.bottom + GAP },
    { left: x(field.right - width), top: field.bottom + GAP },
    { left: x(field.left), top: field.top - GAP - height },
    { left: x(field.right - width), top: field.top - GAP - height },
    { left: field.right + MARGIN, top: besideTop },
    { left: field.left - MARGIN - width, top: besideTop },
  ];
  for (const g of groups) {
    places.push(
      { left: x(field.left), top: g.bottom + GAP },
      { left: x(field.left), top: g.top - GAP - height },
      { left: g.right + MARGIN, top: besideTop },
      { left: g.left - MARGIN - width, top: besideTop },
    );
  }
  let best = places[0];
  let bestKey: number[] | null = null;
  places.forEach((place, index) => {
    const box = { left: place.left, top: place.top, right: place.left + width, bottom: place.top + height };
    // Never past the window's sides (the page does not scroll sideways); above or below it can be scrolled to.
    if (box.left < visible.left || box.right > visible.right) return;
    const inside = box.top >= visible.top && box.bottom <= visible.bottom;
    let near = 0;
    let all = 0;
    for (const c of controls) {
      if (!overlaps(box, c.box)) continue;
      all++;
      if (c.near) near++;
    }
    const key = [near, inside ? 0 : 1, all > 0 ? 1 : 0, index];
    if (bestKey === null || before(key, bestKey)) {
      best = place;
      bestKey = key;
    }
  });
  return best;
}
