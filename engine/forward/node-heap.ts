/**
 * Binary min-heap of grid-node indices keyed by their travel times, on typed arrays, for the
 * fast-marching front ("narrow band"; Sethian, PNAS 93, 1996). No objects are allocated per
 * node: the heap holds node indices in an Int32Array, reads keys from the caller's time
 * array, and keeps each node's heap slot so a node whose time drops can be moved up in
 * O(log n) instead of being pushed twice.
 *
 * Cost: push, decrease and pop are O(log m) for m nodes in the front.
 */
export class NodeHeap {
  private readonly nodes: Int32Array;
  /** Heap slot of each node, −1 when the node is not in the heap. */
  private readonly slotOfNode: Int32Array;
  private readonly keys: Float64Array;
  private count = 0;

  /** @param keys travel time per node; read, never written. */
  constructor(keys: Float64Array) {
    this.keys = keys;
    this.nodes = new Int32Array(keys.length);
    this.slotOfNode = new Int32Array(keys.length).fill(-1);
  }

  /** Empties the heap for the next march on the same nodes. O(m) for the m nodes left in it. */
  clear(): void {
    for (let slot = 0; slot < this.count; slot++) this.slotOfNode[this.nodes[slot]] = -1;
    this.count = 0;
  }

  get size(): number {
    return this.count;
  }

  contains(node: number): boolean {
    return this.slotOfNode[node] >= 0;
  }

  /** Inserts a node, or moves it up after its key dropped. */
  pushOrDecrease(node: number): void {
    let slot = this.slotOfNode[node];
    if (slot < 0) {
      slot = this.count++;
      this.nodes[slot] = node;
      this.slotOfNode[node] = slot;
    }
    this.siftUp(slot);
  }

  /** Removes and returns the node with the least key; −1 when empty. */
  pop(): number {
    if (this.count === 0) return -1;
    const top = this.nodes[0];
    this.slotOfNode[top] = -1;
    this.count--;
    if (this.count > 0) {
      const last = this.nodes[this.count];
      this.nodes[0] = last;
      this.slotOfNode[last] = 0;
      this.siftDown(0);
    }
    return top;
  }

  private siftUp(slot: number): void {
    const nodes = this.nodes;
    const keys = this.keys;
    const pos = this.slotOfNode;
    const node = nodes[slot];
    const key = keys[node];
    while (slot > 0) {
      const parentSlot = (slot - 1) >> 1;
      const parent = nodes[parentSlot];
      if (keys[parent] <= key) break;
      nodes[slot] = parent;
      pos[parent] = slot;
      slot = parentSlot;
    }
    nodes[slot] = node;
    pos[node] = slot;
  }

  private siftDown(slot: number): void {
    const nodes = this.nodes;
    const keys = this.keys;
    const pos = this.slotOfNode;
    const count = this.count;
    const node = nodes[slot];
    const key = keys[node];
    for (;;) {
      let child = 2 * slot + 1;
      if (child >= count) break;
      const right = child + 1;
      if (right < count && keys[nodes[right]] < keys[nodes[child]]) child = right;
      const childNode = nodes[child];
      if (keys[childNode] >= key) break;
      nodes[slot] = childNode;
      pos[childNode] = slot;
      slot = child;
    }
    nodes[slot] = node;
    pos[node] = slot;
  }
}
