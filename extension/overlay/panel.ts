import type { MarkKind } from '../../src/case/schema';
import { message } from '../shared/i18n';
import { h, svg } from './dom';
import { OVERLAY_CSS } from './styles';

/*
 * The overlay's elements, built without behaviour: the first stage draws them the moment the user
 * calls the overlay up, and the session (session.ts) wires these same elements once the rest of the
 * overlay has loaded. Nothing here reads layout or reaches the extension beyond its message table.
 */
export interface ToolDef {
  kind: MarkKind;
  label: string;
  key: string;
  hint: string;
}

/* Our own names for the marking tools; the keys 1-5 choose them. */
export const TOOLS: readonly ToolDef[] = [
  { kind: 'object-span', label: message('ovlToolObject'), key: '1', hint: message('ovlToolObjectHint') },
  { kind: 'landmark-span', label: message('ovlToolLandmark'), key: '2', hint: message('ovlToolLandmarkHint') },
  { kind: 'frame-edges', label: message('ovlToolEdges'), key: '3', hint: message('ovlToolEdgesHint') },
  { kind: 'lane-dash', label: message('ovlToolLane'), key: '4', hint: message('ovlToolLaneHint') },
  { kind: 'object-centre', label: message('ovlToolCentre'), key: '5', hint: message('ovlToolCentreHint') },
];

/** The tool chosen when a session starts. */
export const FIRST_TOOL: MarkKind = 'object-span';

export interface PanelParts {
  surface: HTMLDivElement;
  layer: SVGSVGElement;
  magnifier: HTMLDivElement;
  magCanvas: HTMLCanvasElement;
  toolButtons: Map<MarkKind, HTMLButtonElement>;
  dimension: HTMLSelectElement;
  close: HTMLButtonElement;
  readout: HTMLDivElement;
  notice: HTMLDivElement;
  live: HTMLDivElement;
  panel: HTMLDivElement;
}

/** Appends the stylesheet, the measuring surface, the magnifier and the panel to the host's shadow root. */
export function buildPanel(root: ShadowRoot): PanelParts {
  const layer = svg('svg', { 'aria-hidden': 'true' }) as SVGSVGElement;
  const surface = h('div', { class: 'surface', tabindex: 0, role: 'application', 'aria-label': message('ovlSurfaceLabel') });
  surface.append(layer);
  const magCanvas = h('canvas', { width: 32, height: 32 });
  const magnifier = h('div', { class: 'magnifier', 'aria-hidden': 'true' }, magCanvas, h('div', { class: 'cross-h' }), h('div', { class: 'cross-v' }));

  const tools = h('div', { class: 'row tools', role: 'toolbar', 'aria-label': message('ovlToolsLabel') });
  const toolButtons = new Map<MarkKind, HTMLButtonElement>();
  for (const t of TOOLS) {
    const b = h('button', { type: 'button', 'aria-pressed': t.kind === FIRST_TOOL ? 'true' : 'false', title: message('ovlToolTitle', [t.hint, t.key]), 'data-kind': t.kind }, `${t.key} ${t.label}`);
    toolButtons.set(t.kind, b);
    tools.append(b);
  }
  const dimension = h(
    'select',
    { 'aria-label': message('ovlDimensionLabel') },
    h('option', { value: 'wingspan' }, message('ovlDimensionWingspan')),
    h('option', { value: 'length' }, message('ovlDimensionLength')),
  );
  const close = h('button', { type: 'button', class: 'close', title: message('ovlCloseTitle') }, message('ovlClose'));
  tools.append(dimension, close);

  const readout = h('div', { class: 'readout', 'data-testid': 'readout' });
  const notice = h('div', { class: 'notice', 'data-testid': 'notice' });
  const live = h('div', { class: 'sr', 'aria-live': 'polite', 'data-testid': 'live' });
  const panel = h('div', { class: 'panel', role: 'dialog', 'aria-label': message('ovlPanelLabel') }, tools, readout, notice, h('div', { class: 'caution' }, message('ovlCaution')), live);
  root.append(h('style', {}, OVERLAY_CSS), surface, magnifier, panel);
  return { surface, layer, magnifier, magCanvas, toolButtons, dimension, close, readout, notice, live, panel };
}
