import { DomainInputError, requireFinite } from './errors';

/** A point or direction in 3-D space; lengths in mm unless a function says otherwise. */
export type Vec3 = [number, number, number];

/** a + b */
export function add(a: Vec3, b: Vec3): Vec3 {
	return [a[0] + b[0], a[1] + b[1], a[2] + b[2]];
}

/** a − b */
export function sub(a: Vec3, b: Vec3): Vec3 {
	return [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
}

/** k·a */
export function scale(a: Vec3, k: number): Vec3 {
	return [a[0] * k, a[1] * k, a[2] * k];
}

/** a · b */
export function dot(a: Vec3, b: Vec3): number {
	return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

/** a × b */
export function cross(a: Vec3, b: Vec3): Vec3 {
	return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}

/** Euclidean length of a. */
export function norm(a: Vec3): number {
	return Math.hypot(a[0], a[1], a[2]);
}

/** a scaled to unit length; throws on a zero or non-finite vector. */
export function unit(a: Vec3, field = 'vector'): Vec3 {
	const n = norm(a);
	if (!Number.isFinite(n)) throw new DomainInputError(field, 'must have finite components');
	if (n === 0) throw new DomainInputError(field, 'must not have zero length');
	return [a[0] / n, a[1] / n, a[2] / n];
}

/** Throws unless v is an array of three finite numbers. */
export function requireVec3(v: unknown, field: string): Vec3 {
	if (!Array.isArray(v) || v.length !== 3) {
		throw new DomainInputError(field, 'must be an array of three numbers [x, y, z]');
	}
	requireFinite(v[0], `${field}[0]`);
	requireFinite(v[1], `${field}[1]`);
	requireFinite(v[2], `${field}[2]`);
	return v as Vec3;
}

/** v rotated by angle (radians) about the z axis. */
export function rotateZ(v: Vec3, angle: number): Vec3 {
	const c = Math.cos(angle);
	const s = Math.sin(angle);
	return [c * v[0] - s * v[1], s * v[0] + c * v[1], v[2]];
}

/** Degrees to radians. */
export function rad(deg: number): number {
	return (deg * Math.PI) / 180;
}
