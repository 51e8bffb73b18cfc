/**
 * Keeps labels from overprinting each other: each label offers candidate boxes in order of
 * preference and takes the first that overlaps nothing placed so far (or, if all overlap,
 * the one that overlaps least). Boxes are page mm, axis-aligned.
 */
export interface Box {
  x0: number;
  y0: number;
  x1: number;
  y1: number;
}

export function overlapArea(a: Box, b: Box): number {
  const w = Math.min(a.x1, b.x1) - Math.max(a.x0, b.x0);
  const h = Math.min(a.y1, b.y1) - Math.max(a.y0, b.y0);
  return w > 0 && h > 0 ? w * h : 0;
}

export class LabelPlacer {
  private readonly placed: Box[] = [];

  /** Marks an area (a marker, a title) as taken without placing a label there. */
  reserve(box: Box): void {
    this.placed.push(box);
  }

  /** Index of the chosen candidate; its box is then reserved. */
  choose(candidates: Box[], bounds?: Box): number {
    let best = 0;
    let bestCost = Infinity;
    candidates.forEach((box, i) => {
      let cost = 0;
      for (const other of this.placed) cost += overlapArea(box, other);
      if (bounds && (box.x0 < bounds.x0 || box.x1 > bounds.x1 || box.y0 < bounds.y0 || box.y1 > bounds.y1)) cost += 1e6;
      if (cost < bestCost - 1e-9) {
        best = i;
        bestCost = cost;
      }
    });
    if (candidates.length > 0) this.placed.push(candidates[best]);
    return best;
  }
}
