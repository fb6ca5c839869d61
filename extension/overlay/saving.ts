import type { CaseRecord, Mark } from '../../src/case';
import { message, send } from '../shared/native';
import type { SessionContext } from './state';

/** How long a run of nudges waits after its last key before it is saved. */
const NUDGE_SAVE_MS = 250;

/**
 * A stored version of the case, keeping the local version of a mark whose nudges are not saved yet
 * (`pending`, if it is in `local`): a reply or another tab's write must not undo them. Pure.
 */
export function mergePending(stored: CaseRecord, local: CaseRecord | null, pending: string | null): CaseRecord {
  const mine = pending !== null ? local?.marks.find((m) => m.id === pending) : undefined;
  if (!mine) return stored;
  const has = stored.marks.some((m) => m.id === mine.id);
  return { ...stored, marks: has ? stored.marks.map((m) => (m.id === mine.id ? mine : m)) : [...stored.marks, mine] };
}

/**
 * Every mark is saved through the background at once; nudges are saved a moment after the last key,
 * and any pending save is flushed on close, on a new video, or when another mark is saved.
 */
export class CaseSaver {
  /** The case being marked, '' until the video has a picture. */
  caseId = '';
  private pendingSave: number | undefined;
  /** The mark whose nudges wait for their debounced save. */
  private pendingId: string | null = null;

  constructor(
    private readonly ctx: SessionContext,
    /** Hears each stored version taken (after the session's state holds it). */
    private readonly adopted: (c: CaseRecord) => void,
    /** Hears each mark saved. */
    private readonly saved: (mark: Mark) => void,
  ) {}

  /** Takes a stored version of the case, keeping a nudge that is not saved yet. */
  adopt(c: CaseRecord): void {
    const { state } = this.ctx;
    state.savedCount = c.marks.length;
    state.record = mergePending(c, state.record, this.pendingId);
    this.adopted(state.record);
  }

  /** Shows the mark at once and saves it (debounced for a run of nudges). */
  replaceMark(mark: Mark, debounce: boolean): Promise<void> {
    const { state } = this.ctx;
    if (!state.record) return Promise.resolve();
    const i = state.record.marks.findIndex((m) => m.id === mark.id);
    const marks = i < 0 ? [...state.record.marks, mark] : state.record.marks.map((m) => (m.id === mark.id ? mark : m));
    state.record = { ...state.record, marks };
    this.ctx.redraw();
    // a nudge of another mark still waiting is written now, never dropped
    if (this.pendingId !== null && this.pendingId !== mark.id) this.flush();
    window.clearTimeout(this.pendingSave);
    this.pendingSave = undefined;
    this.pendingId = null;
    if (debounce) {
      this.pendingId = mark.id;
      this.pendingSave = window.setTimeout(() => {
        this.pendingSave = undefined;
        this.pendingId = null;
        void this.save(mark.id);
      }, NUDGE_SAVE_MS);
      return Promise.resolve();
    }
    return this.save(mark.id);
  }

  private async save(markId: string): Promise<void> {
    const mark = this.ctx.state.record?.marks.find((m) => m.id === markId);
    if (!mark) return;
    try {
      this.adopt(await send('mark/put', { caseId: this.caseId, mark }));
      this.saved(mark);
    } catch (err) {
      this.ctx.notice(message('ovlNotSaved', (err as Error).message));
    }
    this.ctx.redraw();
  }

  async remove(markId: string): Promise<void> {
    try {
      this.adopt(await send('mark/remove', { caseId: this.caseId, markId }));
      this.ctx.say(message('ovlRemoved'));
    } catch (err) {
      this.ctx.notice(message('ovlRemoveFailed', (err as Error).message));
    }
    this.ctx.redraw();
  }

  /** Writes a pending nudge now (closing, the video changing, or another mark being saved). */
  flush(): void {
    if (this.pendingId === null) return;
    window.clearTimeout(this.pendingSave);
    const id = this.pendingId;
    this.pendingSave = undefined;
    this.pendingId = null;
    void this.save(id);
  }
}
