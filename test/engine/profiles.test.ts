import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
  CAMERA_PROFILES,
  PROFILE_DERIVATIONS,
  deriveProfile,
  profileById,
  profileHfovRad,
  type CameraProfile,
} from '../../src/engine/profiles';
import { DEG, FULL_FRAME_DIAGONAL_MM } from '../../src/engine/constants';
import { InputError } from '../../src/engine/errors';
import { expectInputError } from './expect-error';

/* Independent arithmetic: 4:3 on the 43.27 mm diagonal is a 3-4-5 triangle (CIPA DCG-001 diagonal). */
const W43 = (FULL_FRAME_DIAGONAL_MM * 4) / 5;
const hfovDeg = (widthMm: number, f: number, crop = 0) => (2 * Math.atan(widthMm / (2 * f) / (1 + crop))) / DEG;


describe('CAMERA_PROFILES data', () => {
  it('has the generic classes asked for, with unique ids', () => {
    const ids = CAMERA_PROFILES.map((p) => p.id);
    expect(new Set(ids).size).toBe(ids.length);
    for (const id of [
      'phone-main-landscape-stabilised',
      'phone-main-landscape',
      'phone-main-portrait-stabilised',
      'phone-telephoto',
      'phone-ultrawide',
      'dashboard-camera',
      'action-camera-wide',
      'compact-camera-wide',
    ]) {
      expect(ids).toContain(id);
    }
  });

  it('every profile has lo <= central <= hi inside (0, 180) deg and a stated basis', () => {
    for (const p of CAMERA_PROFILES) {
      expect(p.hfovDeg.lo).toBeGreaterThan(0);
      expect(p.hfovDeg.hi).toBeLessThan(180);
      expect(p.hfovDeg.lo).toBeLessThanOrEqual(p.hfovDeg.central);
      expect(p.hfovDeg.central).toBeLessThanOrEqual(p.hfovDeg.hi);
      expect(p.basis).toMatch(/common practice/);
      expect(p.label.length).toBeGreaterThan(0);
    }
  });

  it('is frozen so no caller can change a shared profile', () => {
    expect(Object.isFrozen(CAMERA_PROFILES)).toBe(true);
    for (const p of CAMERA_PROFILES) {
      expect(Object.isFrozen(p)).toBe(true);
      expect(Object.isFrozen(p.hfovDeg)).toBe(true);
    }
  });

  it('non-rectilinear classes say the pinhole model is an approximation', () => {
    for (const id of ['phone-ultrawide', 'action-camera-wide', 'dashboard-camera']) {
      expect(profileById(id).basis).toMatch(/pinhole model is an approximation/);
    }
  });

  it('each profile is what deriveProfile gives for its stated derivation', () => {
    PROFILE_DERIVATIONS.forEach((d, i) => expect(CAMERA_PROFILES[i]).toEqual(deriveProfile(d)));
  });
});

describe('derived values against independent arithmetic (phone main cameras 24-28 mm eq., stabilisation crop 10-25 %: common practice, REFERENCES.md)', () => {
  it('phone main, landscape, no crop: central is the 26 mm worked value 67.30 deg (REFERENCES.md), spread 24-28 mm', () => {
    const p = profileById('phone-main-landscape').hfovDeg;
    expect(p.central).toBeCloseTo(67.3, 2);
    expect(p.lo).toBeCloseTo(hfovDeg(W43, 28), 9);
    expect(p.hi).toBeCloseTo(hfovDeg(W43, 24), 9);
  });

  it('phone main, landscape, stabilised: 28 mm with 25 % crop to 24 mm with 10 % crop', () => {
    const p = profileById('phone-main-landscape-stabilised').hfovDeg;
    expect(p.lo).toBeCloseTo(hfovDeg(W43, 28, 0.25), 9);
    expect(p.hi).toBeCloseTo(hfovDeg(W43, 24, 0.1), 9);
    expect(p.central).toBeCloseTo(hfovDeg(W43, 26, 0.175), 9);
    // stabilisation only ever narrows the field
    expect(p.hi).toBeLessThan(profileById('phone-main-landscape').hfovDeg.hi);
  });

  it('phone main, portrait: horizontal is the short side of the 16:9 crop (W43 x 9/16)', () => {
    const p = profileById('phone-main-portrait').hfovDeg;
    expect(p.central).toBeCloseTo(hfovDeg((W43 * 9) / 16, 26), 9);
    const ps = profileById('phone-main-portrait-stabilised').hfovDeg;
    expect(ps.lo).toBeCloseTo(hfovDeg((W43 * 9) / 16, 28, 0.25), 9);
  });

  it('compact camera wide end spans 28 mm on 4:3 with 10 % crop up to 24 mm on 3:2 (73.74 deg, full-frame table in REFERENCES.md)', () => {
    const p = profileById('compact-camera-wide').hfovDeg;
    expect(p.hi).toBeCloseTo(73.74, 2);
    expect(p.lo).toBeCloseTo(hfovDeg(W43, 28, 0.1), 9);
  });

  it('order of classes by field: telephoto < portrait < main < ultra-wide (geometry of the stated bands)', () => {
    const c = (id: string) => profileById(id).hfovDeg.central;
    expect(c('phone-telephoto')).toBeLessThan(c('phone-main-portrait'));
    expect(c('phone-main-portrait')).toBeLessThan(c('phone-main-landscape'));
    expect(c('phone-main-landscape')).toBeLessThan(c('phone-ultrawide'));
  });
});

describe('profileById', () => {
  it('finds a profile by id', () => {
    expect(profileById('phone-ultrawide').id).toBe('phone-ultrawide');
  });

  it('throws InputError naming "camera profile" and listing the ids', () => {
    const e = expectInputError(() => profileById('no-such-camera'), 'camera profile');
    for (const p of CAMERA_PROFILES) expect(e.message).toContain(p.id);
    expectInputError(() => profileById(42 as unknown as string), 'camera profile');
  });

  it('property: any string that is not an id throws InputError', () => {
    const ids = new Set(CAMERA_PROFILES.map((p) => p.id));
    fc.assert(
      fc.property(fc.string(), (s) => {
        if (ids.has(s)) expect(profileById(s).id).toBe(s);
        else expect(() => profileById(s)).toThrow(InputError);
      }),
    );
  });
});

describe('profileHfovRad', () => {
  it('converts degrees to radians for every profile', () => {
    for (const p of CAMERA_PROFILES) {
      const r = profileHfovRad(p);
      expect(r.central).toBeCloseTo(p.hfovDeg.central * DEG, 15);
      expect(r.lo).toBeCloseTo(p.hfovDeg.lo * DEG, 15);
      expect(r.hi).toBeCloseTo(p.hfovDeg.hi * DEG, 15);
    }
  });

  it('rejects a hand-made profile with a field outside (0, 180) deg or out of order', () => {
    const base: CameraProfile = { id: 'x', label: 'x', basis: 'x', hfovDeg: { central: 60, lo: 50, hi: 70 } };
    expectInputError(() => profileHfovRad({ ...base, hfovDeg: { central: 60, lo: 0, hi: 70 } }), 'horizontal field of view (low)');
    expectInputError(() => profileHfovRad({ ...base, hfovDeg: { central: 60, lo: 50, hi: 180 } }), 'horizontal field of view (high)');
    expectInputError(() => profileHfovRad({ ...base, hfovDeg: { central: NaN, lo: 50, hi: 70 } }), 'horizontal field of view (central)');
    expectInputError(() => profileHfovRad({ ...base, hfovDeg: { central: 80, lo: 50, hi: 70 } }), 'horizontal field of view');
    expectInputError(() => profileHfovRad(null as unknown as CameraProfile), 'camera profile');
  });
});
