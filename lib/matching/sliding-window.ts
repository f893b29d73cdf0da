import type { Scratch } from './scratch';

/**
 * Order statistics of a window sliding forward over a column of values: the section builder asks for a
 * trimmed mean and a median once a metre, and the windows of neighbouring metres share nearly all their
 * fixes. Instead of sorting each window afresh, the window's values are kept sorted; a move gathers the
 * values that leave and those that enter, sorts the few of each, and merges them into the sorted values in
 * one pass (one pass a move, not a binary search and a memmove a value).
 */

/** Sorts the first n values of a in place: insertion sort for the handful a metre brings, else the engine's. */
function sortFew(a: Float64Array, n: number): void {
  if (n > 32) {
    a.subarray(0, n).sort();
    return;
  }
  for (let i = 1; i < n; i++) {
    const v = a[i];
    let j = i;
    for (; j > 0 && a[j - 1] > v; j--) a[j] = a[j - 1];
    a[j] = v;
  }
}

/**
 * The values[i] for i in [a0, a1) ∪ [b0, b1), kept sorted, for windows whose four bounds never move back
 * (a0 ≤ a1 ≤ b0 ≤ b1). `sorted` holds them in ascending order, `size` how many (read it after each move: a
 * move writes the merge into a second array and swaps the two).
 * `const w = new SortedWindow(Float64Array.of(3, 1, 2)); w.moveTo(0, 3, 3, 3); w.sorted.subarray(0, w.size)` → `[1, 2, 3]`
 */
export class SortedWindow {
  sorted: Float64Array;
  size = 0;
  private spare: Float64Array;
  private entering: Float64Array;
  private leaving: Float64Array;
  private a0 = 0;
  private a1 = 0;
  private b0 = 0;
  private b1 = 0;

  /** its four columns from `scratch` when given (see Scratch), else its own */
  constructor(private readonly values: Float64Array, scratch?: Scratch) {
    const n = values.length;
    const take = (): Float64Array => (scratch ? scratch.f64(n) : new Float64Array(n));
    this.sorted = take();
    this.spare = take();
    this.entering = take();
    this.leaving = take();
  }

  /** The window becomes [a0, a1) ∪ [b0, b1); each bound at or beyond where it was. */
  moveTo(a0: number, a1: number, b0: number, b1: number): void {
    const o0 = this.a0;
    const o1 = this.a1;
    const o2 = this.b0;
    const o3 = this.b1;
    if (a0 < o0 || a1 < o1 || b0 < o2 || b1 < o3) throw new RangeError('SortedWindow: a bound moved back');
    // only indices a bound passed over can have come in or gone out: walk those stretches, each index once
    const { values, entering, leaving } = this;
    let nIn = 0;
    let nOut = 0;
    let done = -1;
    for (let k = 0; k < 4; k++) {
      const from = k === 0 ? o0 : k === 1 ? o1 : k === 2 ? o2 : o3;
      const to = k === 0 ? a0 : k === 1 ? a1 : k === 2 ? b0 : b1;
      for (let i = from > done + 1 ? from : done + 1; i < to; i++) {
        const was = (i >= o0 && i < o1) || (i >= o2 && i < o3);
        const is = (i >= a0 && i < a1) || (i >= b0 && i < b1);
        if (was && !is) leaving[nOut++] = values[i];
        else if (is && !was) entering[nIn++] = values[i];
        done = i;
      }
    }
    (this.a0 = a0), (this.a1 = a1), (this.b0 = b0), (this.b1 = b1);
    if (nIn === 0 && nOut === 0) return;
    sortFew(entering, nIn);
    sortFew(leaving, nOut);
    // merge: the kept values with the entering ones, each leaving value taken out once where it stands; the
    // kept values between two changes are copied by a loop with one test a value
    const from = this.sorted;
    const to = this.spare;
    const n = this.size;
    let i = 0;
    let e = 0;
    let l = 0;
    let w = 0;
    while (l < nOut || e < nIn) {
      const out = l < nOut ? leaving[l] : Infinity;
      const into = e < nIn ? entering[e] : Infinity;
      if (out <= into) {
        while (i < n && from[i] < out) to[w++] = from[i++];
        if (!(i < n && from[i] === out)) throw new RangeError(`SortedWindow: ${out} is not in the window`);
        (i++), l++;
      } else {
        // an entering value goes after the kept values equal to it
        while (i < n && from[i] <= into) to[w++] = from[i++];
        (to[w++] = into), e++;
      }
    }
    while (i < n) to[w++] = from[i++];
    this.sorted = to;
    this.spare = from;
    this.size = w;
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

  /** its two queues from `scratch` when given (see Scratch), else its own */
  constructor(private readonly values: Float64Array, scratch?: Scratch) {
    this.mins = scratch ? scratch.i32(values.length) : new Int32Array(values.length);
    this.maxs = scratch ? scratch.i32(values.length) : new Int32Array(values.length);
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
