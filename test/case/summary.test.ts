import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { analyseCase, magnitude, type CaseAnalysis } from '../../src/case/analysis';
import { defaultAssumptions } from '../../src/case/assumptions';
import { newCase, upsertMark, withAssumptions } from '../../src/case/marks';
import type { CaseAssumptions, CaseRecord, Mark } from '../../src/case/schema';
import { formatStamp, SUMMARY_CAUTIONS, summaryText, type SummaryOptions } from '../../src/case/summary';
import { InputError } from '../../src/engine/errors';
import type { Estimate } from '../../src/engine/stats';
import { formatEstimate, type UnitSystem } from '../../src/engine/units';

/*
 * The summary held against golden files built from the fixture clips' ground truth (test/fixtures:
 * invented scenes whose truth comes from exact pinhole projection), with the marks placed at the
 * truth pixels as analysis.test.ts places them. Regenerate the golden files with
 * UPDATE_GOLDEN=1 npx vitest run test/case/summary.test.ts, then read every one before committing.
 */
interface Truth {
  video: { width: number; height: number; duration: number };
  frames: {
    t: number;
    object: { x1: number; y1: number; x2: number; y2: number };
    landmarks: { id: string; x1: number; y1: number; x2: number; y2: number }[];
  }[];
}
const load = (name: string) => JSON.parse(readFileSync(`test/fixtures/clips/${name}.truth.json`, 'utf8')) as Truth;

const mapping = { objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 640, height: 360 }, scale: 1, devicePixelRatio: 1 };
function mark(id: string, kind: Mark['kind'], t: number, p: { x1: number; y1: number; x2: number; y2: number }): Mark {
  return { id, kind, t, points: [{ x: p.x1, y: p.y1 }, { x: p.x2, y: p.y2 }], edgeSigmaPx: 0.5, mapping, createdAt: 1 };
}
// fixed instants (invented), so the golden files carry known ISO dates
const CREATED = Date.UTC(2025, 0, 2, 3, 4, 5, 6);
const CHANGED = Date.UTC(2025, 0, 2, 3, 9, 0, 0);
function caseOf(truth: Truth, assumptions: CaseAssumptions | undefined, withLandmark: string | null, frames = truth.frames): CaseRecord {
  const video = { pageUrl: 'http://127.0.0.1/invented-clip', pageTitle: 'Invented test clip', src: '', width: truth.video.width, height: truth.video.height, duration: truth.video.duration };
  let c = newCase('case-invented', video, '0.1.0', CREATED);
  frames.forEach((f, i) => {
    // the older clips' object is a flat target kept square to the line of sight: a span of dimension "other"
    c = upsertMark(c, { ...mark(`o${i}`, 'object-span', f.t, f.object), dimension: 'other' }, CHANGED);
    const lm = f.landmarks.find((l) => l.id === withLandmark);
    if (lm) c = upsertMark(c, { ...mark(`l${i}`, 'landmark-span', f.t, lm), landmarkId: lm.id }, CHANGED);
  });
  return assumptions ? withAssumptions(c, assumptions, CHANGED) : c;
}
const RUN = { draws: 2000, seriesDraws: 2000, seed: 1 };
const VERSION = '0.1.0';

interface Scenario {
  name: string;
  format: 'text' | 'markdown';
  system: UnitSystem;
  build: () => CaseRecord;
}
const SCENARIOS: Scenario[] = [
  {
    // the mast at the fixed point and a known observer speed: implied speed and verdict
    name: 'pass-tracked',
    format: 'text',
    system: 'metric',
    build: () =>
      caseOf(load('pass-tracked'), { ...defaultAssumptions(), cameraLabel: 'known camera', hfovDeg: { lo: 39, hi: 41 }, landmarkSizeM: { lo: 10, hi: 20 }, observerSpeedMs: { lo: 24, hi: 26 } }, 'mast'),
  },
  {
    // no landmark: the range-over-time fit, and the verdict's reason for being absent
    name: 'drift-fixed',
    format: 'markdown',
    system: 'aviation',
    build: () => caseOf(load('drift-fixed'), { ...defaultAssumptions(), cameraLabel: 'known camera', hfovDeg: { lo: 69, hi: 71 }, observerSpeedMs: { lo: 21, hi: 23 } }, null),
  },
  {
    // one marked frame and nothing entered: every assumption is the tool's default
    name: 'one-mark-defaults',
    format: 'text',
    system: 'imperial',
    build: () => {
      const t = load('pass-tracked');
      return caseOf(t, undefined, null, t.frames.slice(0, 1));
    },
  },
];

const analysed = new Map<string, { c: CaseRecord; r: CaseAnalysis }>();
function scenario(s: Scenario) {
  let got = analysed.get(s.name);
  if (!got) {
    const c = s.build();
    got = { c, r: analyseCase(c, RUN) };
    analysed.set(s.name, got);
  }
  return got;
}
const render = (s: Scenario, format = s.format, system = s.system) => {
  const { c, r } = scenario(s);
  return summaryText(c, r, { format, system, toolVersion: VERSION });
};

describe('summaryText against golden files', () => {
  for (const s of SCENARIOS) {
    it(`${s.name} (${s.system}, ${s.format}) matches test/case/golden/${s.name}.${s.format === 'markdown' ? 'md' : 'txt'}`, () => {
      const file = `test/case/golden/${s.name}.${s.format === 'markdown' ? 'md' : 'txt'}`;
      const text = render(s);
      if (process.env.UPDATE_GOLDEN === '1') {
        mkdirSync('test/case/golden', { recursive: true });
        writeFileSync(file, text);
      }
      expect(existsSync(file), `${file} missing: run with UPDATE_GOLDEN=1 once`).toBe(true);
      expect(text).toBe(readFileSync(file, 'utf8'));
    });
  }
});

/** Every Estimate the analysis holds, with the quantity it measures and how the summary shows it. */
function estimatesShown(r: CaseAnalysis, system: UnitSystem): { what: string; e: Estimate; text: string }[] {
  const out: { what: string; e: Estimate; text: string }[] = [];
  const push = (what: string, e: Estimate | undefined, text: (e: Estimate) => string) => e && out.push({ what, e, text: text(e) });
  for (const ts of r.timestamps) {
    const x = ts.result;
    push(`angular size ${ts.t}`, x.angularSize, (e) => formatEstimate(e, 'angle', system));
    push(`range ${ts.t}`, x.range, (e) => formatEstimate(e, 'distance', system));
    push(`landmark range ${ts.t}`, x.landmarkHorizontalRange ?? x.landmarkRange, (e) => formatEstimate(e, 'distance', system));
    // the opposite direction is shown as a magnitude with the word "opposite"
    push(`implied speed ${ts.t}`, x.impliedSpeed, (e) => formatEstimate(e.p95 < 0 ? magnitude(e) : e, 'speed', system));
    push(`fixed point ${ts.t}`, x.fixedPointFraction, (e) => {
      const p = (v: number) => (100 * v).toPrecision(3);
      return `${p(e.median)} % (${p(e.p05)}-${p(e.p95)} %, 5-95 %)`;
    });
  }
  if (r.series) {
    push('closest approach', r.series.closestApproach, (e) => formatEstimate(e, 'distance', system));
    push('relative speed', r.series.relativeSpeed, (e) => formatEstimate(e, 'speed', system));
    push('time of closest approach', r.series.tClosest, (e) => formatEstimate(e, 'time', system));
    push('closest approach, horizontal', r.series.closestHorizontal, (e) => formatEstimate(e, 'distance', system));
    for (const x of r.readings) if (x.pass) push(`object speed ${x.pass.direction}`, x.pass.speed, (v) => formatEstimate(v, 'speed', system));
  }
  for (const ts of r.timestamps) {
    if (!ts.fitted) continue;
    push(`fitted range ${ts.t}`, ts.fitted.range, (e) => formatEstimate(e, 'distance', system));
    push(`fitted horizontal range ${ts.t}`, ts.fitted.horizontalRange, (e) => formatEstimate(e, 'distance', system));
  }
  return out;
}

/** Text with its line wrapping undone, for phrases that plain text may break over two lines. */
const flat = (s: string) => s.replace(/\s+/g, ' ');
const numbers = (s: string) => new Set(s.match(/-?\d+(?:\.\d+)?/g) ?? []);

describe('summary content', () => {
  for (const s of SCENARIOS) {
    const other: SummaryOptions['format'] = s.format === 'text' ? 'markdown' : 'text';
    it(`${s.name}: every estimate of the analysis is shown with its 5-95 % interval, in both formats`, () => {
      const { r } = scenario(s);
      const list = estimatesShown(r, s.system);
      expect(list.length).toBeGreaterThan(0);
      for (const format of ['text', 'markdown'] as const) {
        const text = render(s, format);
        for (const { what, text: shown } of list) {
          expect(shown).toMatch(/\(.+, 5-95 %\)$/);
          expect(text.includes(shown), `${what} (${format}): ${shown}`).toBe(true);
        }
      }
    });

    it(`${s.name}: in the results, no figure with a unit stands without an interval`, () => {
      const text = render(s, 'text');
      // the warnings are advice in words (which frames would settle a fit), not figures
      const all = text.slice(text.indexOf('\nResults\n'), text.indexOf('\nVerdict on the picture\n'));
      const warnings = all.indexOf('\nWarnings\n');
      const results = warnings < 0 ? all : all.slice(0, warnings) + all.slice(all.indexOf('\nPer timestamp\n'));
      expect(results.length).toBeGreaterThan(0);
      const measured = /\d(?:\.\d+)?\s?(?:km\/h|mph|kt|km|NM|mi|ft|m|s|°)(?=[\s,;)]|$)/;
      for (const line of results.split('\n')) {
        // spans are as marked, and a value the case states exactly (the clip's length) says so
        // a timestamp is the frame's own time, as marked: it needs no interval
        const figures = line.replace(/\d+:\d{2}\.\d{3} \(\d+\.\d{3} s\)/g, '');
        if (measured.test(figures) && !/^\s*(?:Object span|- At \d)/.test(line) && !/\bexactly\b/.test(line)) expect(line, line).toMatch(/5-95 %/);
      }
    });

    it(`${s.name}: the cautions appear in both formats`, () => {
      for (const format of ['text', 'markdown'] as const) {
        const text = render(s, format);
        for (const caution of SUMMARY_CAUTIONS) expect(text, `${format}: ${caution}`).toContain(caution);
        expect(text.indexOf(SUMMARY_CAUTIONS[0]!)).toBeLessThan(text.indexOf('What was marked'));
      }
      expect(SUMMARY_CAUTIONS.join(' ')).toMatch(/driving/);
      expect(SUMMARY_CAUTIONS.join(' ')).toMatch(/aviation authority/);
      expect(SUMMARY_CAUTIONS.join(' ')).toMatch(/not a finding about the person/);
    });

    it(`${s.name}: text and ${other} carry the same numbers`, () => {
      const a = numbers(render(s, 'text'));
      const b = numbers(render(s, 'markdown'));
      expect(a.size).toBeGreaterThan(20);
      expect([...a].sort()).toEqual([...b].sort());
    });

    it(`${s.name}: same input, same output; and no NaN, undefined or empty section in any unit system`, () => {
      for (const system of ['metric', 'imperial', 'aviation'] as const) {
        for (const format of ['text', 'markdown'] as const) {
          const first = render(s, format, system);
          // a fresh analysis of a freshly built case: nothing carried over between calls
          const c = s.build();
          const again = summaryText(c, analyseCase(c, RUN), { format, system, toolVersion: VERSION });
          expect(again).toBe(first);
          expect(first).not.toMatch(/NaN|undefined|Infinity|null|\[object/);
          if (format === 'markdown') {
            // every ## heading is followed by content before the next heading
            const parts = first.split(/^## /m).slice(1);
            for (const p of parts) expect(p.split('\n').slice(1).join('').trim().length, p.slice(0, 40)).toBeGreaterThan(0);
          }
        }
      }
    });
  }

  it('sections come in the order the brief sets: clip, cautions, marks, assumptions, results, method, closing line', () => {
    const text = render(SCENARIOS[0]!);
    const order = ['Clip Caliper case summary', 'Page address', 'Cautions', 'What was marked', 'Assumptions', 'Results', 'Method', `Summary by Clip Caliper ${VERSION}`];
    const at = order.map((h) => text.indexOf(h));
    at.forEach((i, k) => expect(i, order[k]).toBeGreaterThanOrEqual(0));
    expect([...at].sort((x, y) => x - y)).toEqual(at);
    expect(text.trimEnd().split('\n').at(-1)).toContain(`Clip Caliper ${VERSION}`);
  });

  it('plain text keeps its lines under 100 characters', () => {
    for (const s of SCENARIOS) for (const line of render(s, 'text').split('\n')) expect(line.length, line).toBeLessThan(100);
  });

  it('dates come from the case as ISO 8601 UTC, not from the clock', () => {
    const text = render(SCENARIOS[0]!);
    expect(text).toContain('2025-01-02T03:04:05.006Z');
    expect(text).toContain('2025-01-02T03:09:00.000Z');
  });

  it('says "default" for each default assumption, and shows the labels', () => {
    const s = SCENARIOS[2]!;
    const { r } = scenario(s);
    expect(r.assumptions.defaults).toBe(true);
    const text = render(s);
    const block = text.slice(text.indexOf('\nAssumptions\n'), text.indexOf('\nResults\n'));
    for (const label of ['Camera label', 'Horizontal field of view', 'Size label', 'Object size', 'Aspect angle', 'Landmark size', 'Kind of object']) {
      const line = block.split('\n').find((l) => l.startsWith(label));
      expect(line, label).toMatch(/\(.*default\)$/);
    }
    expect(block).toContain(r.assumptions.cameraLabel);
    expect(block).toContain(r.assumptions.sizeLabel);
    // a user's own values are "given"; kept default values say they are the tool's
    const mixed = flat(render(SCENARIOS[0]!));
    expect(mixed).toContain('Camera label known camera (given)');
    expect(mixed).toContain('Horizontal field of view 39.0° to 41.0° (given)');
    expect(mixed).toContain('Size label code letter C wingspan, 24-36 m (default)');
    expect(mixed).toContain('Object size 24.0 m to 36.0 m (default)');
    expect(mixed).toContain('Observer speed 86.4 km/h to 93.6 km/h (given)');
  });

  it('pass-tracked: the opposite direction is named and the verdict gives its rule and source', () => {
    const s = SCENARIOS[0]!;
    const { r } = scenario(s);
    const text = flat(render(s));
    expect(r.verdicts).toHaveLength(1);
    expect(text).toContain('opposite to the observer’s travel');
    expect(text).toContain(`rule ${r.verdicts[0]!.verdict.rule.id}`);
    expect(text).toContain('The implied speed is consistent with ordinary flight');
    expect(text).toMatch(/between the road and the object’s track in \d+(\.\d+)? % of draws/);
    expect(text).toContain('2000 draws, seed 1');
  });

  it('drift-fixed: the fit is shown, with a verdict for each direction of travel it allows', () => {
    const s = SCENARIOS[1]!;
    const { r } = scenario(s);
    const text = render(s);
    expect(r.verdicts.length).toBeGreaterThanOrEqual(2);
    expect(text).toContain(`one verdict for each reading (${r.verdicts.length})`);
    expect(text).toContain('the pass over the marked frames, if the object moves against the observer');
    expect(text).toContain('Observation window');
    expect(text).toContain('No landmark was marked on these frames');
    expect(text).not.toContain('Landmark range');
    expect(text).toContain('If the object flies the other way');
    expect(text).toContain('| Time | Object span |');
    expect(text).toMatch(/kt \(/);
  });

  it('one mark: the missing fit and the missing verdict each say why', () => {
    const s = SCENARIOS[2]!;
    const { r } = scenario(s);
    const text = flat(render(s));
    expect(text).toContain(r.seriesMissing!);
    expect(text).toContain(r.verdictMissing!);
    expect(text).toContain('the pass none run (no pass)');
  });
});

describe('summary edge cases', () => {
  const truth = load('pass-tracked');
  const base = caseOf(truth, undefined, null, truth.frames.slice(0, 1));

  it('marked picture edges are named as the camera frame used', () => {
    const c = upsertMark(base, mark('edges', 'frame-edges', truth.frames[0]!.t, { x1: 0, y1: 180, x2: 640, y2: 180 }), CHANGED);
    const text = flat(summaryText(c, analyseCase(c, RUN), { format: 'text', system: 'metric', toolVersion: VERSION }));
    expect(text).toContain('the marked picture edges: left 0.0 px, right 640.0 px (640.0 px wide); the full height, 360.0 px');
    expect(text).toContain('camera frame edges');
    expect(summaryText(base, analyseCase(base, RUN), { format: 'text', system: 'metric', toolVersion: VERSION })).toContain('the whole video, 640.0 x 360.0 px');
  });

  it('a page title cannot inject Markdown, HTML or table cells, nor break plain-text lines', () => {
    const c = { ...base, video: { ...base.video, pageTitle: 'a | b ![x](http://e) <img src=x> *bold*\n# heading' } };
    const r = analyseCase(c, RUN);
    const mdText = summaryText(c, r, { format: 'markdown', system: 'metric', toolVersion: VERSION });
    expect(mdText).toContain('a \\| b !\\[x\\](http://e) \\<img src=x\\> \\*bold\\* \\# heading');
    const plain = summaryText(c, r, { format: 'text', system: 'metric', toolVersion: VERSION });
    expect(plain).toContain('a | b ![x](http://e) <img src=x> *bold* # heading');
  });

  it('a page address is a Markdown autolink when it is a plain web address, escaped text otherwise', () => {
    const at = (pageUrl: string) => {
      const c = { ...base, video: { ...base.video, pageUrl } };
      return summaryText(c, analyseCase(c, RUN), { format: 'markdown', system: 'metric', toolVersion: VERSION });
    };
    expect(at('https://127.0.0.1/a_b?c=1&d=2')).toContain('- **Page address:** <https://127.0.0.1/a_b?c=1&d=2>');
    expect(at('https://127.0.0.1/a b>x')).toContain('- **Page address:** https://127.0.0.1/a b\\>x');
    expect(at('')).toContain('- **Page address:** (none recorded)');
  });

  it('a case with no marks still prints every section, each with something in it', () => {
    const empty = newCase('empty', base.video, VERSION, CREATED);
    const r = analyseCase(empty, RUN);
    const text = summaryText(empty, r, { format: 'markdown', system: 'metric', toolVersion: VERSION });
    expect(text).toContain('Nothing has been marked yet.');
    expect(text).toContain('No figures:');
    expect(text).toContain('single-frame figures none run (nothing solved)');
    expect(text).not.toMatch(/NaN|undefined/);
  });

  it('a live stream has no duration; a signed speed that straddles zero says the direction is not settled', () => {
    const withSpeed = caseOf(truth, { ...defaultAssumptions(), observerSpeedMs: { lo: 24, hi: 26 } }, 'mast', truth.frames.slice(0, 1));
    const r = analyseCase(withSpeed, RUN);
    const ts = r.timestamps[0]!;
    // an invented result: the same analysis with the implied speed moved to straddle zero
    const straddle: CaseAnalysis = { ...r, timestamps: [{ ...ts, result: { ...ts.result, impliedSpeed: { p05: -3, median: 1, p95: 4 } } }] };
    const live = { ...withSpeed, video: { ...withSpeed.video, duration: null } };
    const text = flat(summaryText(live, straddle, { format: 'text', system: 'metric', toolVersion: VERSION }));
    expect(text).toContain('Duration none (a live stream)');
    expect(text).toContain('3.60 km/h (-10.8 to 14.4 km/h, 5-95 %), signed along the observer’s travel: the direction is not settled');
  });

  it('a fixed camera’s ground track is shown with its intervals, and the wind assumed in the verdict', () => {
    const truth = load('drift-fixed');
    const c = caseOf(
      truth,
      { ...defaultAssumptions(), hfovDeg: { lo: 69, hi: 71 }, observerSpeedMs: { lo: 21, hi: 23 }, headwindMs: { lo: -5, hi: 5 }, fixedCamera: { mount: 'vehicle', axisHeadingDeg: { lo: -36, hi: -34 } } },
      null,
    );
    const r = analyseCase(c, { ...RUN, trackDraws: 500 });
    const text = flat(summaryText(c, r, { format: 'text', system: 'metric', toolVersion: VERSION }));
    expect(text).toMatch(/Object ground speed \d+ km\/h \(\d+-\d+ km\/h, 5-95 %\)/);
    expect(text).toMatch(/Heading -?\d+(\.\d)?° \(-?\d+(\.\d)?°? to -?\d+(\.\d)?°, 5-95 %\) from the observer’s direction of travel/);
    expect(text).toContain('Camera aim kept fixed (a mount fixed to the vehicle)');
    expect(text).toContain('Wind -18.0 km/h to 18.0 km/h against the object’s motion');
    expect(text).toContain('Judged on the fixed camera’s ground track');
    expect(text).toMatch(/with the wind assumed, an airspeed of \d+ km\/h/);
  });

  it('a hovering headwind is given with its Beaufort force', () => {
    const withSpeed = caseOf(truth, { ...defaultAssumptions(), observerSpeedMs: { lo: 24, hi: 26 } }, 'mast', truth.frames.slice(0, 1));
    const r = analyseCase(withSpeed, RUN);
    const j = r.verdicts[0]!;
    const v: CaseAnalysis = { ...r, verdicts: [{ ...j, verdict: { ...j.verdict, hover: { headwindNeededMs: 10, beaufort: { force: 5, description: 'fresh breeze' } } } }] };
    const text = flat(summaryText(withSpeed, v, { format: 'markdown', system: 'aviation', toolVersion: VERSION }));
    expect(text).toContain('would need a headwind of about 19.4 kt (from the median speed): Beaufort force 5, fresh breeze');
  });

  it('invalid options and mismatched inputs throw InputError naming the field', () => {
    const r = analyseCase(base, RUN);
    const bad: [unknown, RegExp][] = [
      [{ format: 'html', system: 'metric', toolVersion: VERSION }, /^summary format/],
      [{ format: 'text', system: 'si', toolVersion: VERSION }, /^unit system/],
      [{ format: 'text', system: 'metric', toolVersion: '' }, /^tool version/],
      [null, /^summary options/],
    ];
    for (const [o, msg] of bad) {
      expect(() => summaryText(base, r, o as SummaryOptions)).toThrow(InputError);
      expect(() => summaryText(base, r, o as SummaryOptions)).toThrow(msg);
    }
    const ok = { format: 'text', system: 'metric', toolVersion: VERSION } as const;
    expect(() => summaryText({ ...base, createdAt: Number.NaN }, r, ok)).toThrow(/^case created time/);
    expect(() => summaryText(base, { ...r, timestamps: undefined } as unknown as CaseAnalysis, ok)).toThrow(/^analysis/);
    // the figures of one case with the marks of another
    const other = { ...base, marks: base.marks.map((m) => ({ ...m, id: `x-${m.id}` })) };
    expect(() => summaryText(other, r, ok)).toThrow(InputError);
    expect(() => summaryText(other, r, ok)).toThrow(/^analysis/);
  });
});

describe('formatStamp', () => {
  it('shows m:ss.sss and seconds to the millisecond, carrying a rounded 60 s into the minute', () => {
    expect(formatStamp(0.26)).toBe('0:00.260 (0.260 s)');
    expect(formatStamp(62.5)).toBe('1:02.500 (62.500 s)');
    expect(formatStamp(59.9996)).toBe('1:00.000 (60.000 s)');
  });

  it('property: the minutes and seconds add back to the seconds shown, and seconds stay below 60', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1e6, noNaN: true }), (t) => {
        const m = /^(\d+):(\d{2}\.\d{3}) \((\d+\.\d{3}) s\)$/.exec(formatStamp(t));
        expect(m).not.toBeNull();
        const [, min, sec, total] = m!;
        expect(Number(sec)).toBeLessThan(60);
        expect(Math.round((Number(min) * 60 + Number(sec)) * 1000)).toBe(Math.round(Number(total) * 1000));
        expect(Math.abs(Number(total) - t)).toBeLessThanOrEqual(0.0005 + 1e-9 * t);
      }),
    );
  });

  it('rejects a negative or non-finite time with InputError naming the timestamp', () => {
    expect(() => formatStamp(-1)).toThrow(InputError);
    expect(() => formatStamp(Number.NaN)).toThrow(/^timestamp/);
  });
});
