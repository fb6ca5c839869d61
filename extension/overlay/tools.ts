import type { MarkKind, SpanDimension } from '../../src/case';
import { message } from '../shared/native';
import { trusted } from './dom';
import { DIMENSIONS, TOOLS } from './panel';
import type { SessionContext } from './state';

/** The marking tool and the dimension new object spans are marked as, chosen by button or key. */
export class ToolChoice {
  constructor(
    private readonly ctx: SessionContext,
    /** What to say after the dimension chosen, when it disagrees with the case's size (readout.ts). */
    private readonly mismatch: (d: SpanDimension) => string | null,
  ) {}

  /** Wires the tool and dimension buttons until `signal` aborts. */
  init(signal: AbortSignal): void {
    for (const [kind, b] of this.ctx.el.toolButtons) b.addEventListener('click', trusted(() => this.chooseTool(kind)), { signal });
    for (const [value, b] of this.ctx.el.dimensionButtons) b.addEventListener('click', trusted(() => this.chooseDimension(value)), { signal });
  }

  chooseTool(kind: MarkKind): void {
    const { state } = this.ctx;
    state.tool = kind;
    state.draft = null;
    for (const [k, b] of this.ctx.el.toolButtons) b.setAttribute('aria-pressed', k === kind ? 'true' : 'false');
    const t = TOOLS.find((x) => x.kind === kind)!;
    this.ctx.say(`${t.label}: ${t.hint}`);
    this.ctx.redraw();
  }

  chooseDimension(value: SpanDimension): void {
    this.ctx.state.dimensionPicked = true;
    this.showDimension(value);
    const chosen = message('ovlDimensionChosen', [DIMENSIONS.find((d) => d.value === value)!.label]);
    const mismatch = this.mismatch(value);
    this.ctx.say(mismatch ? `${chosen}. ${mismatch}` : chosen);
    this.ctx.redraw();
  }

  /** Shows `value` as the dimension chosen (a case whose size is a length sets it without the user). */
  showDimension(value: SpanDimension): void {
    this.ctx.state.dimension = value;
    for (const [k, b] of this.ctx.el.dimensionButtons) b.setAttribute('aria-pressed', k === value ? 'true' : 'false');
  }
}
