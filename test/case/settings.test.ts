import { describe, expect, it } from 'vitest';
import { DEFAULT_SETTINGS, readSettings } from '../../src/case/settings';
import { assumptionsFromSettings } from '../../src/case/case-settings';

describe('settings', () => {
  it('fall back field by field to the defaults, keeping every valid stored field', () => {
    expect(readSettings(undefined)).toEqual(DEFAULT_SETTINGS);
    expect(readSettings({ system: 'aviation', cameraProfile: 'dashboard-camera', observerSpeedMs: { lo: 20, hi: 30 } })).toEqual({
      version: 1,
      system: 'aviation',
      cameraProfile: 'dashboard-camera',
      observerSpeedMs: { lo: 20, hi: 30 },
    });
    const bad = readSettings({ system: 'furlongs', cameraProfile: 'no-such-camera', observerSpeedMs: { lo: 30, hi: 20 }, markerName: 7 });
    expect(bad.system).toBe('metric');
    expect(bad.cameraProfile).toBe(DEFAULT_SETTINGS.cameraProfile);
    expect(bad.observerSpeedMs).toBeUndefined();
    expect(bad.markerName).toBeUndefined();
  });

  it('seed new cases: camera profile and observer speed', () => {
    const a = assumptionsFromSettings({ cameraProfile: 'phone-main-landscape', observerSpeedMs: { lo: 25, hi: 27 } });
    expect(a.cameraLabel).toMatch(/no stabilisation/);
    expect(a.observerSpeedMs).toEqual({ lo: 25, hi: 27 });
    expect(() => assumptionsFromSettings({ cameraProfile: 'no-such-camera' })).toThrow(/camera profile/);
  });
});
