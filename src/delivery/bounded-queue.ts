// A fixed-capacity FIFO that never blocks its producer: when full, the oldest item makes room and is counted.
// Alerts are republished by state change, so the newest record of an alert says more than the oldest.

export class BoundedQueue<T> {
  private readonly items: T[] = [];
  private droppedCount = 0;

  constructor(readonly capacity: number) {
    if (!Number.isInteger(capacity) || capacity < 1) throw new RangeError('capacity must be a whole number ≥ 1');
  }

  /** Adds an item; returns the item dropped to make room, if any. */
  push(item: T): T | undefined {
    let dropped: T | undefined;
    if (this.items.length >= this.capacity) {
      dropped = this.items.shift();
      this.droppedCount++;
    }
    this.items.push(item);
    return dropped;
  }

  peek(): T | undefined {
    return this.items[0];
  }

  shift(): T | undefined {
    return this.items.shift();
  }

  get size(): number {
    return this.items.length;
  }

  get dropped(): number {
    return this.droppedCount;
  }
}
