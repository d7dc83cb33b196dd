/**
 * Contact sets of the two classic kinematic couplings, generated from a few design figures so
 * engineers need not type twelve vectors. Ball centres lie in the z = 0 plane on a circle about the
 * origin at 90°, 210° and 330°; each contact normal points from the seat into the ball (the
 * direction the seat pushes the ball) and makes `contactAngle` with the vertical.
 */
import type { Contact } from './constraints';
import { DomainInputError, requireFinite, requirePositive } from './errors';
import { type Vec3, add, cross, rad, rotateZ, scale, sub, unit } from './vec';

const BALL_ANGLES_DEG = [90, 210, 330];
const UP: Vec3 = [0, 0, 1];

function ballCentre(radius: number, i: number): Vec3 {
	const phi = rad(BALL_ANGLES_DEG[i]);
	return [radius * Math.cos(phi), radius * Math.sin(phi), 0];
}

function checkAngle(deg: number): number {
	requireFinite(deg, 'contactAngle_deg');
	if (deg < 0 || deg > 90) {
		throw new DomainInputError('contactAngle_deg', `must be from 0 to 90 degrees (got ${deg})`);
	}
	return rad(deg);
}

/** A contact whose line of action passes through the ball centre along `normal`. */
function contactAt(centre: Vec3, normal: Vec3, ballRadius: number, label: string): Contact {
	return { point: sub(centre, scale(normal, ballRadius)), normal, label };
}

/** The two flank contacts of a ball in a vee whose axis runs along `axis` (horizontal). */
function veeContacts(centre: Vec3, axis: Vec3, theta: number, r: number, name: string): Contact[] {
	const across = unit(cross(UP, axis));
	const up = scale(UP, Math.cos(theta));
	return [
		contactAt(centre, add(up, scale(across, -Math.sin(theta))), r, `${name} flank A`),
		contactAt(centre, add(up, scale(across, Math.sin(theta))), r, `${name} flank B`)
	];
}

/** Design figures for threeVeeContacts. */
export interface ThreeVeeDesign {
	ballCircleRadius_mm: number;
	/** Angle between each contact normal and the vertical (45° for a 90° vee). */
	contactAngle_deg: number;
	/** 0 = groove axes radial (pointing at the centre), 90 = tangential. */
	grooveYaw_deg?: number;
	/** When given, contact points sit on the ball surface; otherwise at the ball centres. */
	ballDiameter_mm?: number;
	/** Leave out one ball (0, 1 or 2) to study a damaged or mis-assembled coupling. */
	omitBall?: 0 | 1 | 2;
}

/** Six contacts of a three-ball, three-vee coupling (Maxwell type). */
export function threeVeeContacts(d: ThreeVeeDesign): Contact[] {
	const radius = requirePositive(d.ballCircleRadius_mm, 'ballCircleRadius_mm');
	const theta = checkAngle(d.contactAngle_deg);
	const yaw = rad(requireFinite(d.grooveYaw_deg ?? 0, 'grooveYaw_deg'));
	const ballR =
		d.ballDiameter_mm === undefined ? 0 : requirePositive(d.ballDiameter_mm, 'ballDiameter_mm') / 2;
	if (d.omitBall !== undefined && d.omitBall !== 0 && d.omitBall !== 1 && d.omitBall !== 2) {
		throw new DomainInputError('omitBall', 'must be 0, 1 or 2');
	}
	const out: Contact[] = [];
	for (let i = 0; i < 3; i++) {
		if (i === d.omitBall) continue;
		const centre = ballCentre(radius, i);
		const inward = unit(scale(centre, -1));
		out.push(...veeContacts(centre, rotateZ(inward, yaw), theta, ballR, `ball ${i + 1} vee`));
	}
	return out;
}

/** Design figures for trihedralVeeFlatContacts. */
export interface TrihedralVeeFlatDesign {
	ballCircleRadius_mm: number;
	/** Angle between each socket and vee contact normal and the vertical. */
	contactAngle_deg: number;
	/** When given, contact points sit on the ball surface; otherwise at the ball centres. */
	ballDiameter_mm?: number;
}

/**
 * Six contacts of a trihedral-socket, vee and flat coupling (Kelvin type): ball 1 (90°) in a
 * trihedral socket, ball 2 (210°) in a vee whose axis points at ball 1, ball 3 (330°) on a flat.
 */
export function trihedralVeeFlatContacts(d: TrihedralVeeFlatDesign): Contact[] {
	const radius = requirePositive(d.ballCircleRadius_mm, 'ballCircleRadius_mm');
	const theta = checkAngle(d.contactAngle_deg);
	const ballR =
		d.ballDiameter_mm === undefined ? 0 : requirePositive(d.ballDiameter_mm, 'ballDiameter_mm') / 2;
	const [c1, c2, c3] = [0, 1, 2].map((i) => ballCentre(radius, i));
	const out: Contact[] = [];
	const inward = unit(scale(c1, -1));
	for (let k = 0; k < 3; k++) {
		const push = rotateZ(inward, rad(120 * k));
		const normal = add(scale(UP, Math.cos(theta)), scale(push, Math.sin(theta)));
		out.push(contactAt(c1, normal, ballR, `ball 1 socket face ${k + 1}`));
	}
	out.push(...veeContacts(c2, unit(sub(c1, c2)), theta, ballR, 'ball 2 vee'));
	out.push(contactAt(c3, UP, ballR, 'ball 3 flat'));
	return out;
}
