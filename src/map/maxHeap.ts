/** Binary max-heap of integer items keyed by a float priority, on growable typed arrays. */
export class MaxHeap {
  private keys: Float64Array;
  private items: Int32Array;
  private length = 0;

  constructor(capacity = 1024) {
    this.keys = new Float64Array(capacity);
    this.items = new Int32Array(capacity);
  }

  get size(): number {
    return this.length;
  }

  push(item: number, key: number): void {
    if (this.length === this.keys.length) this.grow();
    let i = this.length++;
    while (i > 0) {
      const parent = (i - 1) >> 1;
      if (this.keys[parent] >= key) break;
      this.keys[i] = this.keys[parent];
      this.items[i] = this.items[parent];
      i = parent;
    }
    this.keys[i] = key;
    this.items[i] = item;
  }

  /** Removes and returns the item with the largest key (undefined behaviour when empty). */
  pop(): number {
    const top = this.items[0];
    const lastKey = this.keys[--this.length];
    const lastItem = this.items[this.length];
    let i = 0;
    const n = this.length;
    for (;;) {
      let child = 2 * i + 1;
      if (child >= n) break;
      if (child + 1 < n && this.keys[child + 1] > this.keys[child]) child++;
      if (this.keys[child] <= lastKey) break;
      this.keys[i] = this.keys[child];
      this.items[i] = this.items[child];
      i = child;
    }
    this.keys[i] = lastKey;
    this.items[i] = lastItem;
    return top;
  }

  private grow(): void {
    const keys = new Float64Array(this.keys.length * 2);
    keys.set(this.keys);
    const items = new Int32Array(this.items.length * 2);
    items.set(this.items);
    this.keys = keys;
    this.items = items;
  }
}
