import { disagreement, engineAssumptions } from '../../src/case';
import type { CaseRecord, EngineAssumptions, FrameBasis, Mark, SpanDimension } from '../../src/case';
import { message } from '../shared/native';
import { h } from './dom';
import { degreesEstimate, distanceEstimate, speedEstimate, timestamp } from './format';
import { liveBasis, liveFigures } from './live-figures';
import { DIMENSIONS, TOOLS } from './panel';
import type { SessionContext } from './state';

/**
 * The panel's readout: the figures of the frame shown (or of the span being dragged) under the
 * case's assumptions, what they assume, and the spoken line after a save.
 */
const NO_MARKS: readonly Mark[] = [];

export class Readout {
  private assumptions: EngineAssumptions = engineAssumptions(undefined);
  private readonly spanAssumptions = new Map<string, EngineAssumptions>();

  constructor(private readonly ctx: SessionContext) {}

  /** A stored version of the case arrived: its assumptions hold from now. */
  adopt(c: CaseRecord): void {
    this.assumptions = engineAssumptions(c.assumptions, c.marks);
    this.spanAssumptions.clear();
  }

  /**
   * The assumptions for a span marked as `dimension`, made once per stored case: the live readout
   * keeps its last solve while they are the same object, and a redraw runs on every pointer move.
   */
  private assumptionsFor(dimension: NonNullable<Mark['dimension']>): EngineAssumptions {
    let a = this.spanAssumptions.get(dimension);
    if (!a) {
      a = engineAssumptions(this.ctx.state.record?.assumptions, [{ kind: 'object-span', dimension } as Mark]);
      this.spanAssumptions.set(dimension, a);
    }
    return a;
  }

  /** The last basis, kept while its inputs are the same objects: a redraw runs on every pointer move. */
  private last: { a: EngineAssumptions; marks: readonly Mark[]; w: number; h: number; basis: FrameBasis } | null = null;

  private basis(a: EngineAssumptions): FrameBasis {
    const marks = this.ctx.state.record?.marks ?? NO_MARKS;
    const { videoWidth: w, videoHeight: h } = this.ctx.video;
    const l = this.last;
    if (l && l.a === a && l.marks === marks && l.w === w && l.h === h) return l.basis;
    const basis = liveBasis(a, { marks }, w, h);
    this.last = { a, marks, w, h, basis };
    return basis;
  }

  /** Shows the figures for the frame whose marks are `here`. */
  update(here: Mark[]): void {
    const { state, video } = this.ctx;
    const draft = state.draft;
    const draftSpan = draft && draft.kind === 'object-span' && draft.points.length === 2 ? draft : null;
    const obj = draftSpan
      ? { points: draftSpan.points, edgeSigmaPx: this.ctx.mapping.handSigma(draftSpan.points, false), dimension: state.dimension }
      : here.find((x) => x.kind === 'object-span');
    // the default size follows the dimension this span is marked as (assumptions.ts sizeForMarks)
    const spanDimension = obj?.dimension;
    const a = spanDimension ? this.assumptionsFor(spanDimension) : this.assumptions;
    const noteText = here.map((x) => state.snapNotes.get(x.id)).find((x) => x);
    const note = noteText ? [h('div', { class: 'notice', 'data-testid': 'snap-note' }, noteText)] : [];
    const t = video.currentTime;
    const head = h('div', { class: 'muted' }, message(state.savedCount === 1 ? 'ovlFrameHeadOne' : 'ovlFrameHead', [timestamp(t), String(state.savedCount)]));
    const el = this.ctx.el.readout;
    if (!obj) {
      el.replaceChildren(head, h('div', {}, TOOLS.find((x) => x.kind === state.tool)!.hint), ...note);
      return;
    }
    const f = liveFigures(obj, here, t, this.basis(a));
    if (!f) {
      el.replaceChildren(head, h('div', {}, message('ovlOutsidePicture')));
      return;
    }
    const { system } = state;
    const lines: (HTMLElement | string)[] = [
      head,
      h('div', { class: 'big', 'data-testid': 'range' }, message('ovlRange', distanceEstimate(f.result.range, system))),
      h('div', {}, message('ovlSpan', [f.spanPx.toFixed(1), degreesEstimate(f.result.angularSize)])),
    ];
    const lr = f.result.landmarkHorizontalRange ?? f.result.landmarkRange;
    if (lr) lines.push(h('div', {}, message('ovlLandmarkRange', distanceEstimate(lr, system))));
    if (f.result.impliedSpeed) lines.push(h('div', {}, message('ovlImpliedSpeed', speedEstimate(f.result.impliedSpeed, system))));
    const mismatch = this.sizeMismatch(spanDimension);
    if (mismatch) lines.push(h('div', { class: 'notice', 'data-testid': 'dimension-mismatch' }, mismatch));
    lines.push(...note);
    const broadside = a.aspect.lo === a.aspect.hi && Math.abs(a.aspect.lo - Math.PI / 2) < 1e-9;
    // the labels are stored in the case (data); only the sentence around them is ours
    lines.push(h('div', { class: 'muted' }, message(broadside ? 'ovlAssumingBroadside' : 'ovlAssumingAspect', [a.sizeLabel, a.cameraLabel.toLowerCase()])));
    el.replaceChildren(...lines);
  }

  /** When a span marked as `marked` disagrees with the dimension the case's size is: what to tell the user. */
  sizeMismatch(marked: Mark['dimension']): string | null {
    const d = disagreement(marked, this.ctx.state.record?.assumptions);
    if (!d) return null;
    const word = (x: SpanDimension) => DIMENSIONS.find((y) => y.value === x)!.label;
    return message('ovlDimensionMismatch', [word(d.marked), word(d.assumed)]);
  }

  /** Says what a saved mark gave: the span, its angle and the range, with any snap note. */
  announce(mark: Mark): void {
    const { state } = this.ctx;
    const note = state.snapNotes.get(mark.id);
    const speak = (text: string) => this.ctx.say(note ? `${text} ${note}` : text);
    if (mark.kind !== 'object-span' || !state.record) {
      if (note) this.ctx.say(note);
      return;
    }
    // the span alone: the line says its range, which no landmark changes
    const f = liveFigures(mark, [], mark.t, this.basis(this.assumptions));
    if (f) speak(message('ovlSavedSpan', [f.spanPx.toFixed(1), degreesEstimate(f.result.angularSize), distanceEstimate(f.result.range, state.system)]));
    else speak(message('ovlSaved'));
  }
}
