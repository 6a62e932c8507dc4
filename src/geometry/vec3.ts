import type { Vec3 } from './mat4.js';

/**
 * 3-vector arithmetic in world mm for the geometry that works point by point (landmarks, planes,
 * lesion centres, rigid fits). Loops over voxels keep their arithmetic inline on typed arrays.
 */

export function sub(a: Vec3, b: Vec3): [number, number, number] {
  return [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
}

export function dot(a: Vec3, b: Vec3): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

export function cross(a: Vec3, b: Vec3): [number, number, number] {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}

export function norm(a: Vec3): number {
  return Math.hypot(a[0], a[1], a[2]);
}

export function normalise(a: Vec3): [number, number, number] {
  const n = norm(a);
  return [a[0] / n, a[1] / n, a[2] / n];
}

export function distance(a: Vec3, b: Vec3): number {
  return Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);
}
