import type { MarkKind, SpanDimension } from '../../src/case';
import { message } from '../shared/i18n';
import { h, svg } from './dom';

/*
 * The overlay's tools and the panel's elements. The shell (shell.ts) draws them without behaviour;
 * the session (session.ts) finds them here and wires them.
 */
export interface ToolDef {
  kind: MarkKind;
  label: string;
  key: string;
  hint: string;
}

/* Our own names for the marking tools; the keys 1-8 choose them. */
export const TOOLS: readonly ToolDef[] = [
  { kind: 'object-span', label: message('ovlToolObject'), key: '1', hint: message('ovlToolObjectHint') },
  { kind: 'landmark-span', label: message('ovlToolLandmark'), key: '2', hint: message('ovlToolLandmarkHint') },
  { kind: 'frame-edges', label: message('ovlToolEdges'), key: '3', hint: message('ovlToolEdgesHint') },
  { kind: 'lane-dash', label: message('ovlToolLane'), key: '4', hint: message('ovlToolLaneHint') },
  { kind: 'object-centre', label: message('ovlToolCentre'), key: '5', hint: message('ovlToolCentreHint') },
  { kind: 'horizon', label: message('ovlToolHorizon'), key: '6', hint: message('ovlToolHorizonHint') },
  { kind: 'frame-top-bottom', label: message('ovlToolRows'), key: '7', hint: message('ovlToolRowsHint') },
  { kind: 'road-ahead', label: message('ovlToolRoad'), key: '8', hint: message('ovlToolRoadHint') },
];

/** The tool chosen when a session starts. */
export const FIRST_TOOL: MarkKind = 'object-span';

export interface DimensionDef {
  value: SpanDimension;
  label: string;
  key: string;
}

/* Which of the object's dimensions its marked span is; the keys W and L choose them. */
export const DIMENSIONS: readonly DimensionDef[] = [
  { value: 'wingspan', label: message('ovlDimensionWingspan'), key: 'W' },
  { value: 'length', label: message('ovlDimensionLength'), key: 'L' },
];

/** The dimension chosen when a session starts. */
export const FIRST_DIMENSION: SpanDimension = 'wingspan';

export interface PanelParts {
  surface: HTMLDivElement;
  toolButtons: Map<MarkKind, HTMLButtonElement>;
  dimensionButtons: Map<SpanDimension, HTMLButtonElement>;
  close: HTMLButtonElement;
  readout: HTMLDivElement;
  notice: HTMLDivElement;
  live: HTMLDivElement;
  panel: HTMLDivElement;
}

/**
 * The panel's elements inside a shell's shadow root (drawn by shell.ts drawShell), or null when
 * any is missing: the page may have reached into the open root between the two stages.
 */
export function panelParts(root: ShadowRoot): PanelParts | null {
  const q = <E extends Element>(sel: string) => root.querySelector<E>(sel);
  const toolButtons = new Map<MarkKind, HTMLButtonElement>();
  for (const t of TOOLS) {
    const b = q<HTMLButtonElement>(`.tools button[data-kind="${t.kind}"]`);
    if (b) toolButtons.set(t.kind, b);
  }
  const dimensionButtons = new Map<SpanDimension, HTMLButtonElement>();
  for (const d of DIMENSIONS) {
    const b = q<HTMLButtonElement>(`.tools .dims button[data-dimension="${d.value}"]`);
    if (b) dimensionButtons.set(d.value, b);
  }
  const parts = {
    surface: q<HTMLDivElement>('.surface'),
    close: q<HTMLButtonElement>('.tools .close'),
    readout: q<HTMLDivElement>('.panel > .readout'),
    notice: q<HTMLDivElement>('.panel > .notice'),
    live: q<HTMLDivElement>('.panel > .sr'),
    panel: q<HTMLDivElement>('.panel'),
  };
  if (toolButtons.size !== TOOLS.length || dimensionButtons.size !== DIMENSIONS.length || Object.values(parts).some((p) => !p)) return null;
  return { ...(parts as { [K in keyof typeof parts]: NonNullable<(typeof parts)[K]> }), toolButtons, dimensionButtons };
}

export interface MarkLayers {
  layer: SVGSVGElement;
  magnifier: HTMLDivElement;
  magCanvas: HTMLCanvasElement;
}

/**
 * Adds the mark layer (inside the surface) and the magnifier beside it. The shell
 * leaves them out: they show nothing until the session draws, and creating them in the first
 * stage delayed the panel's first layout.
 */
export function addMarkLayers(surface: HTMLDivElement): MarkLayers {
  const layer = svg('svg', { 'aria-hidden': 'true' });
  const magCanvas = h('canvas', { width: 32, height: 32 });
  const magnifier = h('div', { class: 'magnifier', 'aria-hidden': 'true' }, magCanvas, h('div', { class: 'cross-h' }), h('div', { class: 'cross-v' }));
  surface.append(layer);
  surface.after(magnifier);
  return { layer, magnifier, magCanvas };
}

/* The keys that have no button of their own, with the words on the button standing in for each. */
const KEY_BUTTONS: readonly { key: string; label: string }[] = [
  { key: 'Tab', label: message('ovlKeyNextEnd') },
  { key: 'ArrowLeft', label: message('ovlKeyLeft') },
  { key: 'ArrowRight', label: message('ovlKeyRight') },
  { key: 'ArrowUp', label: message('ovlKeyUp') },
  { key: 'ArrowDown', label: message('ovlKeyDown') },
  { key: 's', label: message('ovlKeySnap') },
  { key: 'Delete', label: message('ovlKeyDelete') },
  { key: 'Escape', label: message('ovlKeyCancel') },
];

/**
 * A row of buttons standing in for the keys, put in the panel just before `before`; returned by
 * the key each one stands for.
 */
export function addKeyButtons(panel: HTMLElement, before: Element): Map<string, HTMLButtonElement> {
  const row = h('div', { class: 'row keys', role: 'group', 'aria-label': message('ovlKeyButtonsLabel'), 'data-testid': 'key-buttons' });
  const buttons = new Map<string, HTMLButtonElement>();
  for (const { key, label } of KEY_BUTTONS) {
    const b = h('button', { type: 'button', 'data-key': key }, label);
    row.append(b);
    buttons.set(key, b);
  }
  panel.insertBefore(row, before);
  return buttons;
}
