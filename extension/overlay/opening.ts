import { caseIdFor, stripFragment } from '../../src/case';
import type { VideoInfo } from '../../src/case';
import { message, send } from '../shared/native';
import { watchCase } from './case-watch';
import type { CaseSaver } from './saving';
import type { SessionContext } from './state';

/** What the page says about its video, stored with the case (no fragment, no blob address). */
export function videoInfo(v: HTMLVideoElement): VideoInfo {
  const doc = v.ownerDocument;
  return {
    pageUrl: stripFragment(doc.location.href),
    pageTitle: doc.title.slice(0, 2000),
    src: v.currentSrc.startsWith('blob:') ? '' : v.currentSrc,
    width: v.videoWidth,
    height: v.videoHeight,
    duration: Number.isFinite(v.duration) ? v.duration : null,
  };
}

/**
 * The video's case: opened through the background once the video has a picture, followed while it
 * changes elsewhere (case-watch.ts), and a new one opened when the video changes source.
 */
export class CaseOpening {
  private src = '';
  /** The current case's watch, ended when the video changes source or the session closes. */
  private watch: AbortController | null = null;
  private signal: AbortSignal | null = null;

  constructor(
    private readonly ctx: SessionContext,
    /** Which video of the page this is (part of the case's id). */
    private readonly index: number,
    private readonly saver: CaseSaver,
    /** Refreshes the panel's notes about the video. */
    private readonly describeVideo: () => void,
  ) {}

  /** Opens the case and follows the video's source until `signal` aborts. */
  init(signal: AbortSignal): void {
    this.signal = signal;
    for (const type of ['loadedmetadata', 'emptied']) {
      this.ctx.video.addEventListener(type, () => {
        this.ctx.mapping.invalidate();
        this.sourceChanged();
      }, { signal });
    }
    void this.open();
  }

  private async open(): Promise<void> {
    const { video: v, state } = this.ctx;
    if (v.videoWidth === 0) {
      this.ctx.notice(message('ovlWaiting'));
      return;
    }
    this.src = v.currentSrc;
    const caseId = caseIdFor(v.ownerDocument.location.href, v.currentSrc.startsWith('blob:') ? '' : v.currentSrc, this.index);
    this.saver.caseId = caseId;
    // the popup edits assumptions (and another tab may add marks): follow the stored case
    this.watch?.abort();
    const watch = (this.watch = new AbortController());
    this.signal?.addEventListener('abort', () => watch.abort(), { signal: watch.signal });
    watchCase(caseId, (c) => this.saver.adopt(c), watch.signal);
    try {
      this.saver.adopt(await send('case/open', { caseId, video: videoInfo(v) }));
      this.describeVideo();
      this.ctx.redraw();
      const n = state.record!.marks.length;
      this.ctx.say(message(n === 1 ? 'ovlReadyOne' : 'ovlReadyMany', String(n)));
      // the case log opened this page at a mark: go to it once (taking the request clears it)
      const seek = await send('seek/take', { pageUrl: videoInfo(v).pageUrl }).catch(() => ({ t: null }));
      if (seek.t !== null && Number.isFinite(seek.t) && seek.t >= 0) {
        v.pause();
        v.currentTime = Number.isFinite(v.duration) ? Math.min(seek.t, v.duration) : seek.t;
      }
    } catch (err) {
      this.ctx.notice(message('ovlOpenFailed', (err as Error).message));
    }
  }

  private sourceChanged(): void {
    if (this.ctx.video.currentSrc === this.src) return;
    this.saver.flush();
    // the old case's versions no longer concern this video
    this.watch?.abort();
    const { state } = this.ctx;
    state.record = null;
    state.savedCount = 0;
    state.draft = null;
    state.selected = null;
    this.ctx.say(message('ovlVideoChanged'));
    void this.open();
  }
}
