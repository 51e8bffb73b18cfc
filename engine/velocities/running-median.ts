/**
 * The median of a growing set of numbers, kept as two binary heaps (the lower half in a
 * max-heap, the upper half in a min-heap, sizes equal or the lower one larger by one): a
 * textbook construction (Cormen, Leiserson, Rivest & Stein, Introduction to Algorithms,
 * 3rd ed., 2009, ch. 6 for the heaps). Insert O(log n), median O(1), O(n) memory.
 * The median is defined as simple-statistics' `median` defines it (linear interpolation
 * between the two middle values of an even count, lo + 0.5·(hi − lo)), so that a running
 * fit gives the same number as a fit from scratch.
 * @example
 * const m = new RunningMedian(); [3, 1, 4, 1].forEach((v) => m.add(v)); m.median(); // → 2
 */
export class RunningMedian {
  /** Max-heap of the lower half. */
  private lower: number[] = [];
  private lowerSize = 0;
  /** Min-heap of the upper half. */
  private upper: number[] = [];
  private upperSize = 0;

  get size(): number {
    return this.lowerSize + this.upperSize;
  }

  /** Adds a value (finite). O(log n). */
  add(value: number): void {
    if (this.lowerSize === 0 || value <= -this.lower[0]) this.pushLower(value);
    else this.pushUpper(value);
    // Rebalance: lower holds ⌈n/2⌉ values.
    if (this.lowerSize > this.upperSize + 1) this.pushUpper(this.popLower());
    else if (this.upperSize > this.lowerSize) this.pushLower(this.popUpper());
  }

  /** The median, or null when empty. O(1). */
  median(): number | null {
    if (this.size === 0) return null;
    if (this.lowerSize > this.upperSize) return -this.lower[0];
    const lo = -this.lower[0];
    const hi = this.upper[0];
    return lo + 0.5 * (hi - lo);
  }

  // Both heaps store keys so that the root is the smallest: lower stores −value.
  private pushLower(value: number): void {
    siftUp(this.lower, this.lowerSize++, -value);
  }

  private pushUpper(value: number): void {
    siftUp(this.upper, this.upperSize++, value);
  }

  private popLower(): number {
    return -popMin(this.lower, this.lowerSize--);
  }

  private popUpper(): number {
    return popMin(this.upper, this.upperSize--);
  }
}

/**
 * Inserts key at position `at` (≤ heap.length: a plain array grows by one when at equals
 * its length; a typed array would cost more to allocate, shared/zeros.ts) of a min-heap and
 * restores the order. O(log n).
 */
function siftUp(heap: number[], at: number, key: number): void {
  let i = at;
  while (i > 0) {
    const parent = (i - 1) >> 1;
    if (heap[parent] <= key) break;
    heap[i] = heap[parent];
    i = parent;
  }
  heap[i] = key;
}

/** Removes and returns the root of a min-heap of `size` keys. O(log n). */
function popMin(heap: number[], size: number): number {
  const root = heap[0];
  const last = heap[size - 1];
  const n = size - 1;
  let i = 0;
  for (;;) {
    const l = 2 * i + 1;
    if (l >= n) break;
    const c = l + 1 < n && heap[l + 1] < heap[l] ? l + 1 : l;
    if (heap[c] >= last) break;
    heap[i] = heap[c];
    i = c;
  }
  if (n > 0) heap[i] = last;
  return root;
}
