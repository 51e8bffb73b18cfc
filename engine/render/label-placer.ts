/**
 * Keeps labels from overprinting each other: each label offers candidate boxes in order of
 * preference and takes the first that overlaps nothing placed so far (or, if all overlap,
 * the one that overlaps least). `tryPlace` instead refuses to overprint another label and
 * lets the caller drop one that finds no room. Boxes are page mm, axis-aligned.
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

/** Side of a cell of the box index, mm: about one short label high. */
const CELL_MM = 4;

/**
 * Boxes bucketed by the CELL_MM cells they touch, so a query looks only at its
 * neighbourhood: adding a box is O(cells it covers), a query O(boxes in its cells), where
 * scanning every box would make placing n labels among m marks O(n·m).
 */
class BoxIndex {
  private readonly boxes: Box[] = [];
  private readonly cells = new Map<string, number[]>();

  add(box: Box): void {
    const id = this.boxes.push(box) - 1;
    this.forCells(box, (key) => {
      const list = this.cells.get(key);
      if (list) list.push(id);
      else this.cells.set(key, [id]);
    });
  }

  /** The boxes that may overlap `box`, each once. */
  near(box: Box): Box[] {
    const seen = new Set<number>();
    const out: Box[] = [];
    this.forCells(box, (key) => {
      for (const id of this.cells.get(key) ?? []) {
        if (seen.has(id)) continue;
        seen.add(id);
        out.push(this.boxes[id]);
      }
    });
    return out;
  }

  private forCells(box: Box, visit: (key: string) => void): void {
    const i0 = Math.floor(box.x0 / CELL_MM);
    const i1 = Math.floor(box.x1 / CELL_MM);
    const j0 = Math.floor(box.y0 / CELL_MM);
    const j1 = Math.floor(box.y1 / CELL_MM);
    for (let i = i0; i <= i1; i++) for (let j = j0; j <= j1; j++) visit(`${i},${j}`);
  }
}

export class LabelPlacer {
  private readonly placed: Box[] = [];
  /** Boxes of labels placed so far: tryPlace never overlaps one. */
  private readonly labels = new BoxIndex();
  /** Reserved marks: tryPlace covers as little of them as it can. */
  private readonly marks = new BoxIndex();

  /** Marks an area (a marker, a title) as taken without placing a label there. */
  reserve(box: Box): void {
    this.placed.push(box);
    this.marks.add(box);
  }

  /**
   * For drawings that may hold more labels than fit (the time–distance plot of a 40-shot
   * line): the first candidate, in order of preference, that lies inside `bounds` and
   * overlaps no label placed so far and the fewest reserved marks; null when every
   * candidate would overprint a label (the caller drops the label and says so). The chosen
   * box is then a placed label. With `maxMarkCover` (0–1), a candidate covering more than
   * that fraction of its own area with reserved marks counts as no room either (marks may
   * overlap one another, so the sum is an upper bound). Cost: O(candidates · boxes near
   * each) through the index.
   */
  tryPlace(candidates: Box[], bounds?: Box, maxMarkCover = Infinity): number | null {
    let best: number | null = null;
    let bestCost = Infinity;
    candidates.forEach((box, i) => {
      if (bounds && (box.x0 < bounds.x0 || box.x1 > bounds.x1 || box.y0 < bounds.y0 || box.y1 > bounds.y1)) return;
      if (this.labels.near(box).some((other) => overlapArea(box, other) > 0)) return;
      let cost = 0;
      for (const other of this.marks.near(box)) cost += overlapArea(box, other);
      if (cost > maxMarkCover * (box.x1 - box.x0) * (box.y1 - box.y0)) return;
      if (cost < bestCost - 1e-9) {
        best = i;
        bestCost = cost;
      }
    });
    if (best !== null) {
      this.placed.push(candidates[best]);
      this.labels.add(candidates[best]);
    }
    return best;
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
    if (candidates.length > 0) {
      this.placed.push(candidates[best]);
      this.labels.add(candidates[best]);
    }
    return best;
  }
}
