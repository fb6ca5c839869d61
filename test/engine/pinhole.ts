/*
 * A pinhole camera built the long way, for tests: basis vectors from yaw, pitch and roll, points
 * projected by dot products (the construction of the fixture generator, test/fixtures/lib/geometry.mjs).
 * Ground frame of DESIGN.md: x along the road ahead, y to the left, z up; yaw from +x toward +y.
 */
export type V3 = { x: number; y: number; z: number };
const dot = (a: V3, b: V3) => a.x * b.x + a.y * b.y + a.z * b.z;

export interface Pinhole {
  project(d: V3): { x: number; y: number };
}

export function pinhole(yaw: number, pitch: number, roll: number, f: number, W: number, H: number): Pinhole {
  const fwd = { x: Math.cos(pitch) * Math.cos(yaw), y: Math.cos(pitch) * Math.sin(yaw), z: Math.sin(pitch) };
  const right0 = { x: Math.sin(yaw), y: -Math.cos(yaw), z: 0 };
  const up0 = { x: -Math.sin(pitch) * Math.cos(yaw), y: -Math.sin(pitch) * Math.sin(yaw), z: Math.cos(pitch) };
  // roll turns the image's right axis up
  const right = { x: Math.cos(roll) * right0.x + Math.sin(roll) * up0.x, y: Math.cos(roll) * right0.y + Math.sin(roll) * up0.y, z: Math.cos(roll) * right0.z + Math.sin(roll) * up0.z };
  const up = { x: Math.cos(roll) * up0.x - Math.sin(roll) * right0.x, y: Math.cos(roll) * up0.y - Math.sin(roll) * right0.y, z: Math.cos(roll) * up0.z - Math.sin(roll) * right0.z };
  return {
    project(d: V3) {
      const Z = dot(d, fwd);
      return { x: W / 2 + (f * dot(d, right)) / Z, y: H / 2 - (f * dot(d, up)) / Z };
    },
  };
}

/** Unit direction of a given azimuth (from +x toward +y) and elevation. */
export const dirOf = (azimuth: number, elevation: number): V3 => ({ x: Math.cos(elevation) * Math.cos(azimuth), y: Math.cos(elevation) * Math.sin(azimuth), z: Math.sin(elevation) });
