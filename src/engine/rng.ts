import { integer } from './validate';

/**
 * Seeded pseudo-random generator (xoshiro128**, Blackman & Vigna 2018) seeded through splitmix32.
 * Deterministic across platforms because it uses only 32-bit integer arithmetic. State lives in a
 * Uint32Array so a draw allocates nothing; normals use the polar method with a cached spare.
 */
export class Rng {
  private readonly s = new Uint32Array(4);
  private spare = 0;
  private hasSpare = false;

  constructor(seed: number) {
    integer('seed', seed, 0, 0xffffffff);
    let x = seed >>> 0;
    for (let i = 0; i < 4; i++) {
      // splitmix32 spreads a small seed over the whole state
      x = (x + 0x9e3779b9) >>> 0;
      let z = x;
      z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
      z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
      this.s[i] = (z ^ (z >>> 16)) >>> 0;
    }
    if ((this.s[0]! | this.s[1]! | this.s[2]! | this.s[3]!) === 0) this.s[0] = 1;
  }

  /** Next 32-bit unsigned integer. */
  nextU32(): number {
    const s = this.s;
    const result = Math.imul(rotl(Math.imul(s[1]!, 5), 7), 9) >>> 0;
    const t = (s[1]! << 9) >>> 0;
    s[2]! ^= s[0]!;
    s[3]! ^= s[1]!;
    s[1]! ^= s[2]!;
    s[0]! ^= s[3]!;
    s[2]! ^= t;
    s[3] = rotl(s[3]!, 11);
    return result;
  }

  /** Uniform in [0, 1). */
  uniform(): number {
    return this.nextU32() / 4294967296;
  }

  /** Uniform in [lo, hi). */
  between(lo: number, hi: number): number {
    return lo + (hi - lo) * this.uniform();
  }

  /** Standard normal. */
  normal(): number {
    if (this.hasSpare) {
      this.hasSpare = false;
      return this.spare;
    }
    let u = 0;
    let v = 0;
    let q = 0;
    do {
      u = 2 * this.uniform() - 1;
      v = 2 * this.uniform() - 1;
      q = u * u + v * v;
    } while (q >= 1 || q === 0);
    const m = Math.sqrt((-2 * Math.log(q)) / q);
    this.spare = v * m;
    this.hasSpare = true;
    return u * m;
  }

  /** Normal with mean and standard deviation. */
  gauss(mean: number, sd: number): number {
    return mean + sd * this.normal();
  }
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}
