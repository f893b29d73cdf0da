/**
 * Typed columns for work that is done route by route, handed out as views of buffers kept from route to
 * route: a fresh typed array of more than 64 bytes gets a backing store outside V8's heap, and the section
 * builder made some 15,000 of them a reconciliation (a few dozen values each), at a few microseconds apiece.
 * Views handed out between two `reset()`s never overlap (a buffer too small is replaced by a larger one, and
 * the views already handed out keep the old one); `reset()` hands the space out again, so the views from
 * before it are done with. The views are not zeroed: write before reading.
 * `const s = new Scratch(); const a = s.f64(3); s.reset()`
 */
export class Scratch {
  // small to start with: the buffers grow within the first routes, so that V8 has seen the growing branch
  // before it optimises (a branch it has never seen throws optimised code back the first time it is taken)
  private f = new Float64Array(64);
  private fUsed = 0;
  private i = new Int32Array(64);
  private iUsed = 0;

  /** n doubles, not zeroed */
  f64(n: number): Float64Array {
    if (this.fUsed + n > this.f.length) (this.f = new Float64Array(Math.max(2 * this.f.length, n))), (this.fUsed = 0);
    const v = this.f.subarray(this.fUsed, this.fUsed + n);
    this.fUsed += n;
    return v;
  }

  /** n 32-bit integers, not zeroed */
  i32(n: number): Int32Array {
    if (this.iUsed + n > this.i.length) (this.i = new Int32Array(Math.max(2 * this.i.length, n))), (this.iUsed = 0);
    const v = this.i.subarray(this.iUsed, this.iUsed + n);
    this.iUsed += n;
    return v;
  }

  reset(): void {
    this.fUsed = 0;
    this.iUsed = 0;
  }
}
