import { InputError } from './errors';

/*
 * The computed value of CSS "object-position" (CSS Images 3; a <position> as CSS Backgrounds 3
 * defines it), read into the offsets display.ts places the picture with. What a page's style sheet
 * may write is wide (keywords, edge offsets, calc()); the computed value is narrower, and anything
 * this cannot read is refused by name rather than guessed.
 */

/** A position along one axis: `percent` % of the free space (box minus picture) plus `px`. */
export interface PositionComponent {
  percent: number;
  px: number;
}

export interface ObjectPosition {
  x: PositionComponent;
  y: PositionComponent;
}

const POSITION_ALLOWED =
  'a CSS <position>: 1, 2 or 4 values of left, center, right, top, bottom, percentages, absolute lengths or calc() of them';

/** Absolute units in CSS px (CSS Values 4, 6.2: 1in = 96px = 2.54cm). */
const UNIT_PX = new Map<string, number>([
  ['px', 1],
  ['cm', 96 / 2.54],
  ['mm', 96 / 25.4],
  ['q', 96 / 101.6],
  ['in', 96],
  ['pt', 96 / 72],
  ['pc', 16],
]);

type Keyword = 'left' | 'right' | 'top' | 'bottom' | 'center';
type Token = { kw: Keyword } | { lp: PositionComponent };

function fail(computed: string): never {
  throw new InputError('object-position', computed, POSITION_ALLOWED);
}

/**
 * Reads a computed (or specified) object-position. Chromium computes keywords to percentages and
 * edge offsets to calc(): "right 10px bottom 20px" comes back as "calc(100% - 10px) calc(100% -
 * 20px)". Relative units (em, vw, ...) cannot be resolved here; the computed value never has them.
 */
export function parseObjectPosition(computed: string): ObjectPosition {
  if (typeof computed !== 'string') fail(computed);
  const parts = splitTopLevel(computed.trim().toLowerCase(), computed);
  const t = parts.map((s) => token(s, computed));
  const kw = (i: number): Keyword | undefined => {
    const x = t[i];
    return x !== undefined && 'kw' in x ? x.kw : undefined;
  };
  const lp = (i: number): PositionComponent | undefined => {
    const x = t[i];
    return x !== undefined && 'lp' in x ? x.lp : undefined;
  };
  const centre: PositionComponent = { percent: 50, px: 0 };
  if (t.length === 1) {
    const k = kw(0);
    if (k === 'top' || k === 'bottom') return { x: centre, y: keywordAt(k) };
    return { x: k !== undefined ? keywordAt(k) : lp(0)!, y: centre };
  }
  if (t.length === 2) {
    const k0 = kw(0);
    const k1 = kw(1);
    // "top left", "bottom center", "center right": two keywords in either order
    if (k0 === 'top' || k0 === 'bottom' || k1 === 'left' || k1 === 'right') {
      if (k0 === undefined || k1 === undefined || isHorizontal(k0) || isVertical(k1)) fail(computed);
      return { x: keywordAt(k1), y: keywordAt(k0) };
    }
    return { x: k0 !== undefined ? keywordAt(k0) : lp(0)!, y: k1 !== undefined ? keywordAt(k1) : lp(1)! };
  }
  if (t.length === 4) {
    const k0 = kw(0);
    const k2 = kw(2);
    const o1 = lp(1);
    const o3 = lp(3);
    if (k0 === undefined || k2 === undefined || o1 === undefined || o3 === undefined) fail(computed);
    const h0 = k0 === 'left' || k0 === 'right';
    const v0 = k0 === 'top' || k0 === 'bottom';
    const h2 = k2 === 'left' || k2 === 'right';
    const v2 = k2 === 'top' || k2 === 'bottom';
    if (h0 && v2) return { x: fromEdge(k0, o1), y: fromEdge(k2, o3) };
    if (v0 && h2) return { x: fromEdge(k2, o3), y: fromEdge(k0, o1) };
    fail(computed);
  }
  // css-values-4 <position> has no 3-value form, and Chromium rejects it for object-position
  return fail(computed);
}

function isHorizontal(k: Keyword): boolean {
  return k === 'left' || k === 'right';
}

function isVertical(k: Keyword): boolean {
  return k === 'top' || k === 'bottom';
}

function keywordAt(k: Keyword): PositionComponent {
  return { percent: k === 'left' || k === 'top' ? 0 : k === 'center' ? 50 : 100, px: 0 };
}

/** An offset from the far edge (right, bottom) counts back from 100 %. */
function fromEdge(k: Keyword, o: PositionComponent): PositionComponent {
  return k === 'left' || k === 'top' ? { percent: o.percent, px: o.px } : { percent: 100 - o.percent, px: -o.px };
}

function splitTopLevel(s: string, computed: string): string[] {
  const out: string[] = [];
  let depth = 0;
  let cur = '';
  for (const ch of s) {
    if (ch === '(') depth++;
    if (ch === ')') {
      depth--;
      if (depth < 0) fail(computed);
    }
    if (depth === 0 && /\s/.test(ch)) {
      if (cur !== '') out.push(cur);
      cur = '';
    } else cur += ch;
  }
  if (depth !== 0) fail(computed);
  if (cur !== '') out.push(cur);
  if (out.length === 0) fail(computed);
  return out;
}

const KEYWORDS: readonly Keyword[] = ['left', 'right', 'top', 'bottom', 'center'];

function token(s: string, computed: string): Token {
  const k = KEYWORDS.find((w) => w === s);
  if (k !== undefined) return { kw: k };
  const v = new CalcParser(s, computed).parseWhole();
  if (v.kind !== 'length') {
    // a bare number is a length only when it is 0
    if (v.n !== 0) fail(computed);
    return { lp: { percent: 0, px: 0 } };
  }
  if (!Number.isFinite(v.pct) || !Number.isFinite(v.px)) fail(computed);
  return { lp: { percent: v.pct, px: v.px } };
}

/** A calc() value: a plain number, or percent % + px. */
interface Value {
  kind: 'number' | 'length';
  n: number;
  pct: number;
  px: number;
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?/;

/** Recursive descent over one length-percentage: a dimension, a percentage, or calc() sums and products. */
class CalcParser {
  private i = 0;
  constructor(
    private readonly s: string,
    private readonly computed: string,
  ) {}

  parseWhole(): Value {
    const v = this.primary(false);
    if (this.i !== this.s.length) fail(this.computed);
    return v;
  }

  private ws(): void {
    while (this.i < this.s.length && /\s/.test(this.s[this.i]!)) this.i++;
  }

  private sum(): Value {
    let a = this.product();
    for (;;) {
      this.ws();
      const op = this.s[this.i];
      if (op !== '+' && op !== '-') return a;
      this.i++;
      const b = this.product();
      if (a.kind !== b.kind) fail(this.computed);
      const k = op === '+' ? 1 : -1;
      a = { kind: a.kind, n: a.n + k * b.n, pct: a.pct + k * b.pct, px: a.px + k * b.px };
    }
  }

  private product(): Value {
    let a = this.primary(true);
    for (;;) {
      this.ws();
      const op = this.s[this.i];
      if (op !== '*' && op !== '/') return a;
      this.i++;
      const b = this.primary(true);
      if (op === '*') {
        if (a.kind === 'length' && b.kind === 'length') fail(this.computed);
        const [num, other] = a.kind === 'number' ? [a.n, b] : [b.n, a];
        a = { kind: other.kind, n: num * other.n, pct: num * other.pct, px: num * other.px };
      } else {
        if (b.kind !== 'number' || b.n === 0) fail(this.computed);
        a = { kind: a.kind, n: a.n / b.n, pct: a.pct / b.n, px: a.px / b.n };
      }
    }
  }

  /** inCalc: inside calc() parentheses may group and whitespace may lead. */
  private primary(inCalc: boolean): Value {
    if (inCalc) this.ws();
    const rest = this.s.slice(this.i);
    if (rest.startsWith('calc(') || (inCalc && rest.startsWith('('))) {
      this.i += rest.startsWith('calc(') ? 5 : 1;
      const v = this.sum();
      this.ws();
      if (this.s[this.i] !== ')') fail(this.computed);
      this.i++;
      return v;
    }
    const m = NUMBER.exec(rest);
    if (m === null) fail(this.computed);
    this.i += m[0].length;
    const n = Number(m[0]);
    if (this.s[this.i] === '%') {
      this.i++;
      return { kind: 'length', n: 0, pct: n, px: 0 };
    }
    const u = /^[a-z]+/.exec(this.s.slice(this.i));
    if (u === null) return { kind: 'number', n, pct: 0, px: 0 };
    const f = UNIT_PX.get(u[0]);
    if (f === undefined) fail(this.computed);
    this.i += u[0].length;
    return { kind: 'length', n: 0, pct: 0, px: n * f };
  }
}
