/**
 * Constraint analysis of point contacts by screw theory.
 *
 * A point contact is a line of constraint along its normal n through its point p; in Plücker
 * coordinates its wrench is w = [n ; p × n] (Blanding 1999; Hale 1999 §2.6; Hopkins & Culpepper,
 * Precision Engineering 34 (2010) 259–270). A twist T = [ω ; v_O] of the body is permitted by the
 * contact when n·v_O + (p × n)·ω = 0. Stacking one row per contact gives the constraint matrix A;
 * its rank counts independent constraints, DOF = 6 − rank, redundant = N − rank, and the null space
 * of A is the space of freedoms.
 *
 * Numerics: the origin is moved to the centroid of the contact points and the moment columns are
 * divided by a characteristic length L, so both halves of a row are dimensionless and comparable;
 * rank uses a relative tolerance on the singular values (default 1e-9 σ_max).
 */
import { DomainInputError, requirePositive } from './errors';
import { type Matrix, svd, symmetricEigen } from './linalg';
import { type Vec3, add, cross, dot, norm, requireVec3, scale, sub, unit } from './vec';

/** A point contact: where it touches (mm) and the direction of its normal (any non-zero length). */
export interface Contact {
	point: Vec3;
	normal: Vec3;
	label?: string;
}

/**
 * A rigid-body motion: a rotation about an axis (direction through point), a translation along
 * direction, or a screw (rotation about the axis plus `pitch` mm of advance per radian).
 */
export interface Twist {
	kind: 'rotation' | 'translation' | 'screw';
	direction: Vec3;
	point?: Vec3;
	pitch?: number;
}

/** Result of analyzeConstraints. */
export interface ConstraintAnalysis {
	contacts: number;
	rank: number;
	dof: number;
	redundant: number;
	status: 'exact' | 'under' | 'over' | 'under-and-over';
	/** A basis of the freedom space (length dof): pure rotations and translations where they exist. */
	freedoms: Twist[];
	/** σ_max / σ_min over the non-zero singular values of the length-scaled matrix (1 if rank 0). */
	conditionNumber: number;
	/** Singular values of the length-scaled constraint matrix, descending (6 of them). */
	singularValues: number[];
	/** Characteristic length L (mm) that divided the moment columns. */
	lengthScale_mm: number;
}

/** Options for analyzeConstraints. */
export interface ConstraintOptions {
	/** Characteristic length in mm; default: largest distance of a contact point from their centroid. */
	lengthScale?: number;
	/** Relative tolerance on singular values for the rank; default 1e-9. */
	tolerance?: number;
}

interface Prepared {
	centroid: Vec3;
	length: number;
	points: Vec3[];
	normals: Vec3[];
}

// Below these, a scaled quantity is treated as numerically zero when classifying freedoms.
const OMEGA_ZERO = 1e-8;
const PITCH_ZERO = 1e-7;
// Smallest ratio of two opposite principal pitches that are combined into pure rotations.
const PITCH_BALANCE = 1e-6;

function prepare(contacts: Contact[], lengthScale?: number): Prepared {
	if (!Array.isArray(contacts)) throw new DomainInputError('contacts', 'must be an array');
	const points: Vec3[] = [];
	const normals: Vec3[] = [];
	contacts.forEach((c, i) => {
		if (c === null || typeof c !== 'object') {
			throw new DomainInputError(`contacts[${i}]`, 'must be an object with point and normal');
		}
		points.push(requireVec3(c.point, `contacts[${i}].point`));
		normals.push(unit(requireVec3(c.normal, `contacts[${i}].normal`), `contacts[${i}].normal`));
	});
	let centroid: Vec3 = [0, 0, 0];
	for (const p of points) centroid = add(centroid, p);
	if (points.length > 0) centroid = scale(centroid, 1 / points.length);
	let length: number;
	if (lengthScale !== undefined) {
		length = requirePositive(lengthScale, 'options.lengthScale');
	} else {
		length = 0;
		let reach = 0;
		for (const p of points) {
			length = Math.max(length, norm(sub(p, centroid)));
			reach = Math.max(reach, Math.abs(p[0]), Math.abs(p[1]), Math.abs(p[2]));
		}
		// Coordinates carry ~1e-16 relative rounding, so spans below a millionth of their size are
		// noise at the rank tolerance; and points within a picometre are one point (scale 1 mm).
		length = Math.max(length, 1e-6 * reach);
		if (!(length > 1e-9)) length = 1;
	}
	return { centroid, length, points, normals };
}

/** One row per contact: [((p − c) × n)/L, n], acting on the scaled twist [ω·L ; v_c]. */
function constraintMatrix(prep: Prepared): Matrix {
	return prep.points.map((p, i) => {
		const n = prep.normals[i];
		const m = scale(cross(sub(p, prep.centroid), n), 1 / prep.length);
		return [m[0], m[1], m[2], n[0], n[1], n[2]];
	});
}

function clean(x: number, eps: number): number {
	return Math.abs(x) < eps ? 0 : x;
}

/** Flip a direction so its first clearly non-zero component is positive (a deterministic sign). */
function canonicalSign(d: Vec3): Vec3 {
	for (const x of d) {
		if (Math.abs(x) > 1e-9) return x < 0 ? scale(d, -1) : d;
	}
	return d;
}

/** Reduced row echelon form then Gram–Schmidt: a tidy orthonormal basis of a subspace of R³. */
function tidyBasis(vectors: Vec3[]): Vec3[] {
	const rows = vectors.map((v) => v.slice() as Vec3);
	let lead = 0;
	for (let r = 0; r < rows.length && lead < 3; r++) {
		let pivot = r;
		for (let i = r; i < rows.length; i++) {
			if (Math.abs(rows[i][lead]) > Math.abs(rows[pivot][lead])) pivot = i;
		}
		if (Math.abs(rows[pivot][lead]) < 1e-9) {
			lead++;
			r--;
			continue;
		}
		[rows[r], rows[pivot]] = [rows[pivot], rows[r]];
		rows[r] = scale(rows[r], 1 / rows[r][lead]);
		for (let i = 0; i < rows.length; i++) {
			if (i !== r) rows[i] = sub(rows[i], scale(rows[r], rows[i][lead]));
		}
		lead++;
	}
	const out: Vec3[] = [];
	for (const row of rows) {
		let w = row;
		for (const b of out) w = sub(w, scale(b, dot(w, b)));
		if (norm(w) > 1e-9) out.push(unit(w));
	}
	return out;
}

/** Scaled twist [ω·L ; v_c] about the centroid → geometric Twist in the caller's frame. */
function toTwist(omegaL: Vec3, v: Vec3, prep: Prepared): Twist {
	const L = prep.length;
	if (norm(omegaL) <= OMEGA_ZERO * Math.max(norm(v), 1e-300)) {
		return {
			kind: 'translation',
			direction: canonicalSign(unit(v).map((x) => clean(x, 1e-12)) as Vec3)
		};
	}
	const omega = scale(omegaL, 1 / L);
	const w2 = dot(omega, omega);
	let u = unit(omega);
	const scaledPitch = dot(omegaL, v) / dot(omegaL, omegaL);
	const axisPoint = add(prep.centroid, scale(cross(omega, v), 1 / w2));
	u = canonicalSign(u.map((x) => clean(x, 1e-12)) as Vec3);
	const nearest = sub(axisPoint, scale(u, dot(axisPoint, u)));
	const point = nearest.map((x) => clean(x, 1e-12 * Math.max(L, norm(prep.centroid)))) as Vec3;
	if (Math.abs(scaledPitch) <= PITCH_ZERO) return { kind: 'rotation', direction: u, point };
	return { kind: 'screw', direction: u, point, pitch: dot(omega, v) / w2 };
}

type Six = number[];

function lin(vectors: Six[], coeffs: number[]): Six {
	const out = [0, 0, 0, 0, 0, 0];
	vectors.forEach((vec, j) => {
		for (let i = 0; i < 6; i++) out[i] += coeffs[j] * vec[i];
	});
	return out;
}

const omegaOf = (t: Six): Vec3 => [t[0], t[1], t[2]];
const velOf = (t: Six): Vec3 => [t[3], t[4], t[5]];

/**
 * Turn an orthonormal null-space basis into readable freedoms: translations first (the part with
 * no rotation), then the principal screws of the rest; where the pitch form is indefinite, pairs of
 * principal screws of opposite pitch are combined into zero-pitch twists (pure rotations), which
 * for a two-freedom system are exactly its two real rotation axes — unless the two pitches differ
 * by more than a factor 1e6, when those rotations would be nearly parallel and the screws are kept.
 */
function readableFreedoms(nulls: Six[], prep: Prepared): Twist[] {
	const d = nulls.length;
	if (d === 0) return [];
	const w: Matrix = [0, 1, 2].map((i) => nulls.map((t) => t[i]));
	const ws = svd(w, d);
	const translations: Vec3[] = [];
	const rotational: Six[] = [];
	ws.values.forEach((s, j) => {
		const coeffs = ws.v.map((row) => row[j]);
		const t = lin(nulls, coeffs);
		if (s <= OMEGA_ZERO) translations.push(velOf(t));
		else rotational.push(t);
	});
	const tBasis = tidyBasis(translations);
	// Adding translations keeps a twist inside the freedom space; strip them from the rest.
	const rot = rotational.map((t) => {
		let v = velOf(t);
		for (const b of tBasis) v = sub(v, scale(b, dot(v, b)));
		return [t[0], t[1], t[2], v[0], v[1], v[2]];
	});
	const out: Twist[] = tBasis.map((dir) => ({
		kind: 'translation',
		direction: canonicalSign(dir)
	}));
	const k = rot.length;
	if (k === 0) return out;
	const g: Matrix = rot.map((a) => rot.map((b) => dot(omegaOf(a), omegaOf(b))));
	const m: Matrix = rot.map((a) =>
		rot.map((b) => (dot(omegaOf(a), velOf(b)) + dot(omegaOf(b), velOf(a))) / 2)
	);
	// G^(−1/2) so that the principal screws have unit ω.
	const ge = symmetricEigen(g);
	const gInvSqrt: Matrix = g.map((_, i) =>
		g.map((__, j) =>
			ge.values.reduce(
				(acc, lam, l) => acc + (ge.vectors[i][l] * ge.vectors[j][l]) / Math.sqrt(lam),
				0
			)
		)
	);
	const mul = (x: Matrix, y: Matrix): Matrix =>
		x.map((row) => y[0].map((_, j) => row.reduce((acc, xv, l) => acc + xv * y[l][j], 0)));
	const mt = mul(mul(gInvSqrt, m), gInvSqrt);
	const pe = symmetricEigen(mt);
	const c = mul(gInvSqrt, pe.vectors);
	const principal = pe.values.map((h, i) => ({
		h,
		t: lin(
			rot,
			c.map((row) => row[i])
		)
	}));
	const zero = principal.filter((p) => Math.abs(p.h) <= PITCH_ZERO);
	const pos = principal.filter((p) => p.h > PITCH_ZERO);
	const neg = principal.filter((p) => p.h < -PITCH_ZERO);
	const twists: Six[] = zero.map((p) => p.t);
	if (pos.length > 0 && neg.length > 0) {
		const iso = (p: (typeof principal)[number], q: (typeof principal)[number], sign: number) =>
			lin([p.t, q.t], [Math.sqrt(-q.h), sign * Math.sqrt(p.h)]);
		// Pitches of very different size give zero-pitch twists that are nearly parallel (axes
		// far away, almost translations): keep the principal screws there, a well-conditioned basis.
		const balanced = (p: (typeof principal)[number], q: (typeof principal)[number]) =>
			Math.min(p.h, -q.h) / Math.max(p.h, -q.h) >= PITCH_BALANCE;
		const [p0, q0] = [pos[0], neg[0]];
		if (balanced(p0, q0)) twists.push(iso(p0, q0, 1), iso(p0, q0, -1));
		else twists.push(p0.t, q0.t);
		for (const p of pos.slice(1)) twists.push(balanced(p, q0) ? iso(p, q0, 1) : p.t);
		for (const q of neg.slice(1)) twists.push(balanced(p0, q) ? iso(p0, q, 1) : q.t);
	} else {
		twists.push(...pos.map((p) => p.t), ...neg.map((p) => p.t));
	}
	for (const t of twists) out.push(toTwist(omegaOf(t), velOf(t), prep));
	return out;
}

/** Rank, degrees of freedom, redundancy and freedom twists of a set of point contacts. */
export function analyzeConstraints(
	contacts: Contact[],
	options: ConstraintOptions = {}
): ConstraintAnalysis {
	const tolerance = options.tolerance ?? 1e-9;
	requirePositive(tolerance, 'options.tolerance');
	if (tolerance >= 1) throw new DomainInputError('options.tolerance', 'must be below 1');
	const prep = prepare(contacts, options.lengthScale);
	const a = constraintMatrix(prep);
	const { values, v } = svd(a, 6);
	const threshold = tolerance * values[0];
	let rank = 0;
	while (rank < 6 && values[rank] > threshold) rank++;
	const nulls: Six[] = [];
	for (let j = rank; j < 6; j++) nulls.push(v.map((row) => row[j]));
	const dof = 6 - rank;
	const redundant = prep.points.length - rank;
	const status =
		dof === 0 && redundant === 0
			? 'exact'
			: dof > 0 && redundant === 0
				? 'under'
				: dof === 0
					? 'over'
					: 'under-and-over';
	return {
		contacts: prep.points.length,
		rank,
		dof,
		redundant,
		status,
		freedoms: readableFreedoms(nulls, prep),
		conditionNumber: rank === 0 ? 1 : values[0] / values[rank - 1],
		singularValues: values,
		lengthScale_mm: prep.length
	};
}

/** The twist as ω (rad per unit) and the velocity of the body point at the origin. */
export function twistVectors(twist: Twist): { omega: Vec3; velocity: Vec3 } {
	if (twist === null || typeof twist !== 'object') {
		throw new DomainInputError('twist', 'must be an object with kind and direction');
	}
	const dir = unit(requireVec3(twist.direction, 'twist.direction'), 'twist.direction');
	if (twist.kind === 'translation') return { omega: [0, 0, 0], velocity: dir };
	if (twist.kind !== 'rotation' && twist.kind !== 'screw') {
		throw new DomainInputError('twist.kind', "must be 'rotation', 'translation' or 'screw'");
	}
	const q =
		twist.point === undefined ? ([0, 0, 0] as Vec3) : requireVec3(twist.point, 'twist.point');
	let velocity = cross(q, dir);
	if (twist.kind === 'screw') {
		const h = twist.pitch ?? 0;
		if (!Number.isFinite(h)) throw new DomainInputError('twist.pitch', 'must be a finite number');
		velocity = add(velocity, scale(dir, h));
	}
	return { omega: dir, velocity };
}

/**
 * Whether every contact permits the twist: |n̂·(v_O + ω × p)| ≤ tolerance × (|ω|·L + |v_c|) for each
 * contact, with L the contacts' characteristic length and v_c the velocity at their centroid.
 */
export function permitsTwist(contacts: Contact[], twist: Twist, tolerance = 1e-6): boolean {
	requirePositive(tolerance, 'tolerance');
	const prep = prepare(contacts);
	const { omega, velocity } = twistVectors(twist);
	const vc = add(velocity, cross(omega, prep.centroid));
	const size = norm(omega) * prep.length + norm(vc);
	return prep.points.every((p, i) => {
		const vp = add(velocity, cross(omega, p));
		return Math.abs(dot(prep.normals[i], vp)) <= tolerance * size;
	});
}
