import { describe, expect, it } from 'vitest';
import { keyAction, type KeyMods } from '../../../extension/overlay/keys';

/*
 * The overlay's key table (README.md, "key | tool or action"), by the key names of the W3C UI Events
 * KeyboardEvent key Values ("ArrowLeft", "Escape", " " for the space bar, "Delete", "Backspace",
 * "Tab"). Tab is taken only while an end is selected, so that otherwise it moves focus on as usual:
 * WCAG 2.1 success criterion 2.1.2, No Keyboard Trap.
 */
const none: KeyMods = { ctrl: false, alt: false, shift: false };
const onSurface = (key: string, mods: KeyMods = none, selected = false) => keyAction(key, mods, true, selected);

describe('keyAction', () => {
  it('1 to 8 choose the tools in the README order; W and L (either case) the dimension', () => {
    const kinds = ['1', '2', '3', '4', '5', '6', '7', '8'].map((k) => onSurface(k));
    expect(kinds).toEqual(
      ['object-span', 'landmark-span', 'frame-edges', 'lane-dash', 'object-centre', 'horizon', 'frame-top-bottom', 'road-ahead'].map((kind) => ({ do: 'tool', kind })),
    );
    expect(onSurface('w')).toEqual({ do: 'dimension', value: 'wingspan' });
    expect(onSurface('L')).toEqual({ do: 'dimension', value: 'length' });
  });

  it('leaves the browser its Ctrl and Alt shortcuts on the tool and dimension keys (common practice)', () => {
    expect(onSurface('1', { ...none, ctrl: true })).toBeNull();
    expect(onSurface('w', { ...none, alt: true })).toBeNull();
  });

  it('arrows move by 1 px, with Shift 10 px, with Alt 0.1 px, along screen x and y (y down)', () => {
    expect(onSurface('ArrowLeft')).toEqual({ do: 'nudge', dx: -1, dy: 0 });
    expect(onSurface('ArrowRight', { ...none, shift: true })).toEqual({ do: 'nudge', dx: 10, dy: 0 });
    expect(onSurface('ArrowUp', { ...none, alt: true })).toEqual({ do: 'nudge', dx: 0, dy: -0.1 });
    expect(onSurface('ArrowDown')).toEqual({ do: 'nudge', dx: 0, dy: 1 });
  });

  it('Enter and Space place a point, S snaps and Delete or Backspace removes, only on the picture', () => {
    for (const [key, action] of [['Enter', 'place'], [' ', 'place'], ['s', 'snap'], ['S', 'snap'], ['Delete', 'remove'], ['Backspace', 'remove'], ['ArrowLeft', 'nudge']] as const) {
      expect(onSurface(key)?.do, key).toBe(action);
      // on a panel button these keep their own meaning (press the button, move in a group)
      expect(keyAction(key, none, false, true), key).toBeNull();
    }
  });

  it('Tab cycles the ends only while one is selected; Shift+Tab goes back', () => {
    expect(onSurface('Tab')).toBeNull();
    expect(onSurface('Tab', none, true)).toEqual({ do: 'cycle', dir: 1 });
    expect(onSurface('Tab', { ...none, shift: true }, true)).toEqual({ do: 'cycle', dir: -1 });
  });

  it('Escape cancels and H toggles the panel from anywhere in the overlay; other keys are not ours', () => {
    expect(keyAction('Escape', none, false, false)).toEqual({ do: 'cancel' });
    expect(keyAction('h', none, false, false)).toEqual({ do: 'toggle-panel' });
    expect(keyAction('H', none, true, false)).toEqual({ do: 'toggle-panel' });
    for (const key of ['a', 'q', 'F5', 'PageDown', 'Unidentified']) expect(onSurface(key), key).toBeNull();
  });
});
