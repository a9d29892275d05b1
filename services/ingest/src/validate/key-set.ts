// A set of string keys held as 64-bit hashes in typed arrays (12 bytes a slot), so a batch of millions
// of stems can be checked for duplicate tree ids in tens of megabytes instead of hundreds. Two
// different keys share a 64-bit hash with probability about n²/2⁶⁵ (4·10⁻⁷ for 4 million keys); the
// database's unique constraint on (visit, tree) stays the final guard.

/** Two independent 32-bit FNV-1a style hashes of a string (different offsets and primes), mixed at the end. */
export function hash64(s: string): [number, number] {
  let a = 0x811c9dc5 | 0;
  let b = 0x9747b28c | 0;
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    a = Math.imul(a ^ c, 0x01000193);
    b = Math.imul(b ^ c, 0x5bd1e995);
  }
  a ^= a >>> 16;
  a = Math.imul(a, 0x85ebca6b);
  a ^= a >>> 13;
  b ^= b >>> 15;
  b = Math.imul(b, 0xc2b2ae35);
  b ^= b >>> 16;
  return [a | 0, b | 0];
}

export class KeySet {
  private hi: Int32Array;
  private lo: Int32Array;
  /** Line of the first occurrence; 0 marks an empty slot (lines of data rows start at 2). */
  private lines: Int32Array;
  private used = 0;

  constructor(capacity = 1 << 16) {
    let n = 1 << 4;
    while (n < capacity) n <<= 1;
    this.hi = new Int32Array(n);
    this.lo = new Int32Array(n);
    this.lines = new Int32Array(n);
  }

  get size(): number {
    return this.used;
  }

  /** Adds a key first seen on `line` (≠ 0; use -1 for "already stored"); returns 0 if new, else the line it was first seen on. */
  add(key: string, line: number): number {
    if (line === 0) throw new RangeError('KeySet.add: line 0 is reserved');
    const [h, l] = hash64(key);
    const mask = this.hi.length - 1;
    let i = (l ^ (h >>> 7)) & mask;
    for (;;) {
      const at = this.lines[i];
      if (at === 0) break;
      if (this.hi[i] === h && this.lo[i] === l) return at;
      i = (i + 1) & mask;
    }
    this.hi[i] = h;
    this.lo[i] = l;
    this.lines[i] = line;
    if (++this.used * 4 > this.hi.length * 3) this.grow();
    return 0;
  }

  private grow(): void {
    const { hi, lo, lines } = this;
    const n = hi.length * 2;
    this.hi = new Int32Array(n);
    this.lo = new Int32Array(n);
    this.lines = new Int32Array(n);
    const mask = n - 1;
    for (let k = 0; k < hi.length; k++) {
      if (lines[k] === 0) continue;
      let i = (lo[k] ^ (hi[k] >>> 7)) & mask;
      while (this.lines[i] !== 0) i = (i + 1) & mask;
      this.hi[i] = hi[k];
      this.lo[i] = lo[k];
      this.lines[i] = lines[k];
    }
  }
}
