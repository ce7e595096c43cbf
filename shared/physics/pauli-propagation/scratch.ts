/** Reused scratch buffers of one propagation. */

export class Scratch {
  flip: Uint32Array = new Uint32Array(0);
  candIdx: Int32Array = new Int32Array(0);
  sel: Float64Array = new Float64Array(0);
  lastThr = 0;
  selBuf(n: number): Float64Array {
    if (this.sel.length < n) this.sel = new Float64Array(Math.ceil(n * 1.5));
    return this.sel;
  }
  /** A zeroed scratch word buffer of length S (callers re-zero it after use). */
  flipWords(S: number): Uint32Array {
    if (this.flip.length !== S) this.flip = new Uint32Array(S);
    return this.flip;
  }
  del: Int32Array = new Int32Array(1024);
  drop: Uint8Array = new Uint8Array(0);
  abs: Float64Array = new Float64Array(0);
  dropFlags(n: number): Uint8Array {
    if (this.drop.length < n) this.drop = new Uint8Array(Math.ceil(n * 1.5));
    else this.drop.fill(0, 0, n);
    return this.drop;
  }
}
