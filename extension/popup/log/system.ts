import type { UnitSystem } from '../../../src/case';
import { useEffect, useState } from 'preact/hooks';
import { DEFAULT_SETTINGS, loadSettings, onSettingsChanged } from '../../shared/settings';

/*
 * The unit system from the settings, held once for the whole log: every row's headline reads it,
 * and the summary export takes it as it is when asked. One follower of the settings feeds them all.
 */
let now: UnitSystem = DEFAULT_SETTINGS.system;
const listeners = new Set<(s: UnitSystem) => void>();

function adopt(s: UnitSystem): void {
  now = s;
  listeners.forEach((f) => f(s));
}

export const currentSystem = (): UnitSystem => now;

/** Reads the settings and follows them (the log view does this once, while it is shown); returns the way to stop. */
export function followSystem(): () => void {
  void loadSettings().then((s) => adopt(s.system));
  return onSettingsChanged((s) => adopt(s.system));
}

/** The unit system, redrawn when the settings change. */
export function useSystem(): UnitSystem {
  const [s, setS] = useState(now);
  useEffect(() => {
    listeners.add(setS);
    return () => {
      listeners.delete(setS);
    };
  }, []);
  return s;
}
