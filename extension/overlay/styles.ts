/** The overlay's own look, inside its shadow root: light and dark from the system, visible focus. */
export const OVERLAY_CSS = `
:host { all: initial; }
* { box-sizing: border-box; }
.surface { position: absolute; inset: 0; cursor: crosshair; touch-action: none; }
.surface svg { position: absolute; inset: 0; width: 100%; height: 100%; overflow: visible; }
.panel {
  --bg: #fafcff; --fg: #13202d; --muted: #4f5f72; --line: #c8d2de; --accent: #0b63c7;
  --warn: #8a4b00; --mark-object: #e8590c; --mark-landmark: #2b8a3e; --mark-frame: #7048e8; --mark-lane: #0b7285;
  position: absolute; left: 8px; top: 8px; max-width: min(30rem, calc(100% - 16px));
  background: var(--bg); color: var(--fg); border: 1px solid var(--line); border-radius: 8px;
  font: 13px/1.4 system-ui, sans-serif; padding: 6px 8px; box-shadow: 0 2px 10px rgba(0,0,0,.25);
  cursor: default; user-select: none;
}
@media (prefers-color-scheme: dark) {
  .panel { --bg: #131a22; --fg: #e7edf4; --muted: #a3b3c6; --line: #334253; --accent: #6cb2ff; --warn: #ffc46b; }
}
.panel[data-where="below"] { top: calc(100% + 6px); left: 0; }
.panel[data-where="above"] { top: auto; bottom: calc(100% + 6px); left: 0; }
.panel[hidden] { display: none; }
.row { display: flex; flex-wrap: wrap; gap: 4px; align-items: center; }
.tools button, .close {
  font: inherit; color: var(--fg); background: transparent; border: 1px solid var(--line);
  border-radius: 5px; padding: 2px 7px; cursor: pointer;
}
.tools button[aria-pressed="true"] { background: var(--accent); border-color: var(--accent); color: #fff; }
button:focus-visible, .surface:focus-visible { outline: 2px solid var(--accent); outline-offset: 2px; }
.close { margin-left: auto; }
/* one control of two halves: which dimension the object's span is */
.dims { display: flex; margin-left: 4px; }
.tools .dims button:first-child { border-radius: 5px 0 0 5px; }
.tools .dims button + button { border-left-width: 0; border-radius: 0 5px 5px 0; }
.readout { margin-top: 4px; font-variant-numeric: tabular-nums; }
.readout .big { font-weight: 600; }
.muted { color: var(--muted); }
.notice { color: var(--warn); margin-top: 3px; }
.caution { color: var(--muted); margin-top: 3px; }
.magnifier {
  position: absolute; width: 128px; height: 128px; border: 2px solid #fff; border-radius: 50%;
  box-shadow: 0 0 0 1px #000, 0 2px 8px rgba(0,0,0,.4); pointer-events: none; overflow: hidden; display: none;
}
.magnifier canvas { width: 100%; height: 100%; image-rendering: pixelated; }
.magnifier .cross-h, .magnifier .cross-v { position: absolute; background: rgba(255, 40, 40, 0.85); }
.magnifier .cross-h { left: 0; right: 0; top: calc(50% - 0.5px); height: 1px; }
.magnifier .cross-v { top: 0; bottom: 0; left: calc(50% - 0.5px); width: 1px; }
.sr { position: absolute; width: 1px; height: 1px; overflow: hidden; clip: rect(0 0 0 0); white-space: nowrap; }
`;
