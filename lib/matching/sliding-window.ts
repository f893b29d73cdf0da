/**
 * Order statistics of a window sliding forward over a column of values: the section builder asks for a
 * trimmed mean and a median once a metre, and the windows of neighbouring metres share nearly all their
 * fixes. Instead of sorting each window afresh, the window's values are kept sorted and only the values that
 * enter or leave it are inserted or removed (a binary search and a memmove each).
 */

/**
 * The values[i] for i in [a0, a1) ∪ [b0, b1), kept sorted, for windows whose four bounds never move back
 * (a0 ≤ a1 ≤ b0 ≤ b1). `sorted` holds them in ascending order, `size` how many.
 * `const w = new SortedWindow(Float64Array.of(3, 1, 2)); w.moveTo(0, 3, 3, 3); w.sorted.subarray(0, w.size)` → `[1, 2, 3]`
 */
export class SortedWindow {
  readonly sorted: Float64Array;
  size = 0;
  private a0 = 0;
  private a1 = 0;
  private b0 = 0;
  private b1 = 0;

  constructor(private readonly values: Float64Array) {
    this.sorted = new Float64Array(values.length);
  }

  /** The window becomes [a0, a1) ∪ [b0, b1); each bound at or beyond where it was. */
  moveTo(a0: number, a1: number, b0: number, b1: number): void {
    const o0 = this.a0;
    const o1 = this.a1;
    const o2 = this.b0;
    const o3 = this.b1;
    if (a0 < o0 || a1 < o1 || b0 < o2 || b1 < o3) throw new RangeError('SortedWindow: a bound moved back');
    // only indices a bound passed over can have come in or gone out: walk those stretches, each index once
    let done = -1;
    for (let k = 0; k < 4; k++) {
      const from = k === 0 ? o0 : k === 1 ? o1 : k === 2 ? o2 : o3;
      const to = k === 0 ? a0 : k === 1 ? a1 : k === 2 ? b0 : b1;
      for (let i = from > done + 1 ? from : done + 1; i < to; i++) {
        const was = (i >= o0 && i < o1) || (i >= o2 && i < o3);
        const is = (i >= a0 && i < a1) || (i >= b0 && i < b1);
        if (was && !is) this.remove(this.values[i]);
        else if (is && !was) this.insert(this.values[i]);
        done = i;
      }
    }
    (this.a0 = a0), (this.a1 = a1), (this.b0 = b0), (this.b1 = b1);
  }

  /** first position whose value is ≥ v (lower) or > v (upper) */
  private search(v: number, upper: boolean): number {
    let lo = 0;
    let hi = this.size;
    const s = this.sorted;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (s[mid] < v || (upper && s[mid] === v)) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  }

  private insert(v: number): void {
    const at = this.search(v, true);
    this.sorted.copyWithin(at + 1, at, this.size);
    this.sorted[at] = v;
    this.size++;
  }

  private remove(v: number): void {
    const at = this.search(v, false);
    if (at >= this.size || this.sorted[at] !== v) throw new RangeError(`SortedWindow: ${v} is not in the window`);
    this.sorted.copyWithin(at, at + 1, this.size);
    this.size--;
  }
}

/**
 * Smallest and largest value, and how many are not NaN, of values[lo … hi − 1] for a window whose bounds
 * never move back: monotone queues (each index enters and leaves once), NaN values skipped.
 * `const x = new WindowExtremes(Float64Array.of(5, NaN, 2)); x.moveTo(0, 3); [x.min(), x.max(), x.count]` → `[2, 5, 2]`
 */
export class WindowExtremes {
  count = 0;
  private lo = 0;
  private hi = 0;
  private readonly mins: Int32Array;
  private readonly maxs: Int32Array;
  private minHead = 0;
  private minTail = 0;
  private maxHead = 0;
  private maxTail = 0;

  constructor(private readonly values: Float64Array) {
    this.mins = new Int32Array(values.length);
    this.maxs = new Int32Array(values.length);
  }

  moveTo(lo: number, hi: number): void {
    if (lo < this.lo || hi < this.hi || lo > hi) throw new RangeError('WindowExtremes: a bound moved back');
    const v = this.values;
    for (let i = this.hi; i < hi; i++) {
      if (v[i] !== v[i]) continue;
      this.count++;
      while (this.minTail > this.minHead && v[this.mins[this.minTail - 1]] >= v[i]) this.minTail--;
      this.mins[this.minTail++] = i;
      while (this.maxTail > this.maxHead && v[this.maxs[this.maxTail - 1]] <= v[i]) this.maxTail--;
      this.maxs[this.maxTail++] = i;
    }
    // indices below lo leave (lo ≤ hi: every one of them has entered)
    for (let i = this.lo; i < lo; i++) if (v[i] === v[i]) this.count--;
    while (this.minHead < this.minTail && this.mins[this.minHead] < lo) this.minHead++;
    while (this.maxHead < this.maxTail && this.maxs[this.maxHead] < lo) this.maxHead++;
    this.lo = lo;
    this.hi = hi;
  }

  /** Infinity when the window holds no number */
  min(): number {
    return this.minHead < this.minTail ? this.values[this.mins[this.minHead]] : Infinity;
  }

  /** −Infinity when the window holds no number */
  max(): number {
    return this.maxHead < this.maxTail ? this.values[this.maxs[this.maxHead]] : -Infinity;
  }
}
