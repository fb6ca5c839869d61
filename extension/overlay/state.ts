import type { CaseRecord, MarkKind, Point, SpanDimension, UnitSystem } from '../../src/case';
import type { OverlayHost } from './host';
import type { VideoMapping } from './mapping';
import { FIRST_DIMENSION, FIRST_TOOL } from './panel';

/*
 * What the parts of one measuring session share (session.ts ties them): the session's state, the
 * elements they draw in, and the few services every part may call. Each part takes this and the
 * session's AbortSignal; none of them holds another part's state.
 */

/** A mark being placed: its first end down, the second following the pointer or the keys. */
export interface Draft {
  kind: MarkKind;
  t: number;
  points: Point[];
  /** Whether the lens showed as each point was placed (the hand's floor depends on it). */
  lens: boolean[];
}

export interface SessionState {
  record: CaseRecord | null;
  /** How many marks the background has stored, by its last reply: the readout says "saved" of these only. */
  savedCount: number;
  tool: MarkKind;
  dimension: SpanDimension;
  /** Set once the user picks a dimension here; until then new spans follow the case's size. */
  dimensionPicked: boolean;
  draft: Draft | null;
  selected: { markId: string; end: number } | null;
  cursor: Point | null;
  /** The units chosen in the settings, followed live. */
  system: UnitSystem;
  /** The name the settings give for whoever marks, '' when none. */
  markerName: string;
  /**
   * Each end's own sigma, for the marks placed or edited here: a mark stores one, the ends' root mean
   * square, so an edit of one end needs the other's (end-sigmas.ts).
   */
  readonly endSigmas: Map<string, number[]>;
  /** Why a snap left an end of a mark where the user put it, shown while the mark is in view. */
  readonly snapNotes: Map<string, string>;
}

export function newState(): SessionState {
  return {
    record: null,
    savedCount: 0,
    tool: FIRST_TOOL,
    dimension: FIRST_DIMENSION,
    dimensionPicked: false,
    draft: null,
    selected: null,
    cursor: null,
    system: 'metric',
    markerName: '',
    endSigmas: new Map(),
    snapNotes: new Map(),
  };
}

/** The panel's elements and the layers over the video. */
export interface SessionElements {
  surface: HTMLDivElement;
  panel: HTMLDivElement;
  readout: HTMLDivElement;
  notice: HTMLDivElement;
  live: HTMLDivElement;
  layer: SVGSVGElement;
  magnifier: HTMLDivElement;
  magCanvas: HTMLCanvasElement;
  toolButtons: Map<MarkKind, HTMLButtonElement>;
  dimensionButtons: Map<SpanDimension, HTMLButtonElement>;
}

export interface SessionContext {
  readonly video: HTMLVideoElement;
  readonly host: OverlayHost;
  readonly el: SessionElements;
  readonly state: SessionState;
  readonly mapping: VideoMapping;
  /** Announces through the live region (a repeated message is announced again). */
  say(text: string): void;
  /** Sets the panel's standing notice. */
  notice(text: string): void;
  /** Draws the marks and the readout now. */
  redraw(): void;
}
