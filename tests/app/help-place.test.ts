// Where a field's help bubble goes (help-place.ts): next to the field, covering no control of
// the field's own form where some place allows it, never past the window's sides. Boxes
// are plain rectangles; "covers" is a positive-area overlap of two boxes.
import { describe, expect, it } from 'vitest';
import { GAP, MARGIN, overlaps, placeBubble, type Box, type Control } from '../../src/app/help-place.ts';

const box = (left: number, top: number, width: number, height: number): Box => ({ left, top, right: left + width, bottom: top + height });
const near = (b: Box): Control => ({ box: b, near: true });
const far = (b: Box): Control => ({ box: b, near: false });
const size = { width: 380, height: 100 };
const at = (p: { left: number; top: number }) => box(p.left, p.top, size.width, size.height);

describe('placeBubble', () => {
  const window = box(0, 0, 1440, 1000);
  const field = box(600, 300, 190, 26);

  it('puts the bubble under the field, from its left edge, when that covers nothing', () => {
    expect(placeBubble(field, size, window, [])).toEqual({ left: 600, top: 326 + GAP });
  });

  it('keeps it inside the window\'s width, MARGIN from the edge', () => {
    const right = box(1300, 300, 120, 26);
    expect(placeBubble(right, size, window, [])).toEqual({ left: 1440 - MARGIN - 380, top: 326 + GAP });
  });

  it('goes above the field when a neighbour of its form sits under it, and beside it when one sits above too', () => {
    const below = near(box(600, 340, 190, 26));
    expect(placeBubble(field, size, window, [below])).toEqual({ left: 600, top: 300 - GAP - 100 });
    const above = near(box(600, 260, 190, 26));
    const place = placeBubble(field, size, window, [below, above]);
    expect(place).toEqual({ left: 790 + MARGIN, top: 300 });
    for (const c of [below, above]) expect(overlaps(at(place), c.box)).toBe(false);
  });

  it('the map\'s point count at 800 px: the threshold under it, the range above, the other axis to its left, no room to its right: above or below the form', () => {
    // The amplitude-error fieldset on the right, the detuning one on the left, the contour's threshold under both.
    const narrow = box(0, 0, 800, 1000);
    const points = box(630, 430, 135, 26);
    const controls = [
      near(box(630, 400, 135, 26)), // "to" above
      near(box(630, 370, 135, 26)), // "from"
      near(box(390, 430, 135, 26)), // the detuning's points, to the left
      near(box(390, 400, 135, 26)),
      near(box(390, 370, 135, 26)),
      near(box(390, 495, 380, 26)), // the threshold, under both
      far(box(360, 575, 140, 26)), // "Against", under the form
    ];
    const fieldset = box(540, 340, 235, 130);
    const form = box(295, 340, 480, 200);
    const place = placeBubble(points, size, narrow, controls, [fieldset, form]);
    for (const c of controls.filter((c) => c.near)) expect(overlaps(at(place), c.box)).toBe(false);
    expect(at(place).right).toBeLessThanOrEqual(800);
    expect(at(place).left).toBeGreaterThanOrEqual(0);
  });

  it('prefers a place that covers another form\'s control to one that covers its own form\'s, and none to either', () => {
    const below = near(box(600, 340, 190, 26));
    const above = near(box(600, 260, 190, 26));
    const right = far(box(800, 300, 100, 26));
    // Right covers a control of another form; left covers nothing.
    expect(placeBubble(field, size, window, [below, above, right])).toEqual({ left: 600 - MARGIN - 380, top: 300 });
    // With a control of another form on the left as well, the first of the two, the right.
    const left = far(box(300, 300, 100, 26));
    expect(placeBubble(field, size, window, [below, above, right, left])).toEqual({ left: 790 + MARGIN, top: 300 });
  });

  it('covers the fewest controls of the form when every place covers some', () => {
    // Neighbours on every side, two under the field and one everywhere else: not under it.
    const crowd = [near(box(600, 340, 100, 26)), near(box(700, 340, 90, 26)), near(box(600, 260, 190, 26)), near(box(800, 300, 300, 100)), near(box(100, 280, 480, 60))];
    const place = placeBubble(field, size, window, crowd);
    expect(crowd.filter((c) => overlaps(at(place), c.box)).length).toBe(1);
  });

  it('prefers a place inside the window to one below its bottom', () => {
    const low = box(600, 930, 190, 26);
    expect(placeBubble(low, size, window, [])).toEqual({ left: 600, top: 930 - GAP - 100 });
  });
});
