import { integer } from './validate';

/**
 * Seeded pseudo-random generator (xoshiro128**, Blackman & Vigna 2018) seeded through splitmix32.
 * Deterministic across platforms because it uses only 32-bit integer arithmetic (and, for normals,
 * tables computed once at load). State lives in a Uint32Array so a draw allocates nothing.
 */
export class Rng {
  private readonly s = new Uint32Array(4);
  private readonly slowOut = new Float64Array(1);

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
    return this.nextI32() >>> 0;
  }

  /**
   * The same draw as a signed 32-bit integer. Hot paths use this one: a value above 2^31 does not fit
   * V8's small integers, so a uint32 returned from a call that is not inlined is boxed.
   */
  private nextI32(): number {
    const s = this.s;
    const result = Math.imul(rotl(Math.imul(s[1]!, 5), 7), 9) | 0;
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

  /**
   * Standard normal by the ziggurat method (Marsaglia & Tsang, J. Stat. Softw. 5(8), 2000), 128
   * layers. One 32-bit draw gives both the layer (its low 7 bits) and the value (its high 25 bits,
   * signed), so index and value come from disjoint bits, which avoids the index/value correlation
   * Doornik (2005) found in the original. About 99 % of draws take the fast path: one table look-up
   * and one multiply.
   */
  normal(): number {
    const bits = this.nextI32();
    const iz = bits & 127;
    const hz = bits >> 7; // signed 25-bit value
    // the fast path stays this small so that V8 inlines it: a call that is not inlined returns its
    // double boxed, which would allocate on every draw
    if (Math.abs(hz) < ZIG_K[iz]!) return hz * ZIG_W[iz]!;
    this.normalSlow(iz, hz);
    return this.slowOut[0]!;
  }

  /**
   * The ziggurat's rare branches: the base strip's tail, and the wedges between layers. The value goes
   * to `slowOut`, not the return: a double returned from a call V8 does not inline is boxed, and this
   * path runs for about 1 % of draws (a thousand allocations in a 100 000-normal solve). For the same
   * reason it draws through nextI32, whose result always fits a small integer.
   */
  private normalSlow(iz: number, hz: number): void {
    const out = this.slowOut;
    for (;;) {
      const x = hz * ZIG_W[iz]!;
      if (iz === 0) {
        // the tail beyond r, by Marsaglia's (1964) method
        let a = 0;
        let b = 0;
        do {
          a = -Math.log(1 - (this.nextI32() >>> 0) / 4294967296) / ZIG_R;
          b = -Math.log(1 - (this.nextI32() >>> 0) / 4294967296);
        } while (b + b < a * a);
        out[0] = hz > 0 ? ZIG_R + a : -ZIG_R - a;
        return;
      }
      // accept under the density
      if (ZIG_F[iz]! + ((this.nextI32() >>> 0) / 4294967296) * (ZIG_F[iz - 1]! - ZIG_F[iz]!) < Math.exp(-0.5 * x * x)) {
        out[0] = x;
        return;
      }
      const bits = this.nextI32();
      iz = bits & 127;
      hz = bits >> 7;
      if (Math.abs(hz) < ZIG_K[iz]!) {
        out[0] = hz * ZIG_W[iz]!;
        return;
      }
    }
  }

  /** Fills out[0..n) with normals of standard deviation sd, with no per-draw allocation. */
  fillNormal(out: Float64Array, n: number, sd = 1): void {
    for (let i = 0; i < n; i++) out[i] = sd * this.normal();
  }

  /** Fills out[0..n) with uniforms in [lo, hi). */
  fillBetween(out: Float64Array, n: number, lo: number, hi: number): void {
    for (let i = 0; i < n; i++) out[i] = lo + (hi - lo) * (this.nextU32() / 4294967296);
  }

  /** Normal with mean and standard deviation. */
  gauss(mean: number, sd: number): number {
    return mean + sd * this.normal();
  }
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}

/* Ziggurat tables for the standard normal, 128 layers (Marsaglia & Tsang 2000, their zigset). */
const ZIG_R = 3.442619855899;
const ZIG_K = new Float64Array(128);
const ZIG_W = new Float64Array(128);
const ZIG_F = new Float64Array(128);
(() => {
  const m1 = 16777216; // 2^24: the scale of the signed 25-bit value
  const vn = 9.91256303526217e-3;
  let dn = ZIG_R;
  let tn = dn;
  const q = vn / Math.exp(-0.5 * dn * dn);
  ZIG_K[0] = (dn / q) * m1;
  ZIG_K[1] = 0;
  ZIG_W[0] = q / m1;
  ZIG_W[127] = dn / m1;
  ZIG_F[0] = 1;
  ZIG_F[127] = Math.exp(-0.5 * dn * dn);
  for (let i = 126; i >= 1; i--) {
    dn = Math.sqrt(-2 * Math.log(vn / dn + Math.exp(-0.5 * dn * dn)));
    ZIG_K[i + 1] = (dn / tn) * m1;
    tn = dn;
    ZIG_F[i] = Math.exp(-0.5 * dn * dn);
    ZIG_W[i] = dn / m1;
  }
})();
