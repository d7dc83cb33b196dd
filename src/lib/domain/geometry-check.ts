/**
 * The coupling geometry check: constraint analysis, freedoms in words, ball positions for the
 * diagram and Hertz stress per contact at the preload, from one set of point contacts.
 *
 * Load sharing (common practice; statics of the contact geometry): the preload is vertical and
 * shared equally by the balls present; the contacts of one ball share its vertical load equally, so
 * a contact whose normal makes θ with the vertical carries N = F_ball / (k cos θ) for k contacts on
 * that ball (a vee flank: F / (2 cos θ); a trihedral face: F / (3 cos θ); a flat: F). Every contact
 * is treated as a ball on a flat (flat-flanked vees, flat socket faces), so hertzBallOnFlat gives its
 * size and pressure (Johnson, Contact Mechanics (1985) §3.4).
 */
import {
	type Contact,
	type ConstraintAnalysis,
	type Twist,
	analyzeConstraints
} from './constraints';
import { type Material, hertzBallOnFlat } from './hertz';
import { type Vec3, add, dot, norm, scale, sub, unit } from './vec';

/** A freedom as words plus the geometry the diagram needs. */
export interface FreedomReport {
	kind: Twist['kind'];
	words: string;
	direction: Vec3;
	point: Vec3 | null;
}

/** Hertz figures of one contact at the preload. */
export interface ContactStress {
	label: string;
	load_N: number;
	a_mm: number;
	p0_MPa: number;
	approach_um: number;
	stiffness_N_per_um: number;
	/** allowable − p₀ (MPa); negative when over the limit. */
	margin_MPa: number;
	/** p₀ as a fraction of the allowable pressure. */
	utilisation: number;
}

/** Everything the results panel shows. */
export interface GeometryReport {
	status: ConstraintAnalysis['status'];
	dof: number;
	redundant: number;
	rank: number;
	contactCount: number;
	conditionNumber: number;
	conditionWords: string;
	freedoms: FreedomReport[];
	contacts: Contact[];
	balls: { label: string; centre: Vec3 }[];
	ballDiameter_mm: number;
	/** null when there is no preload to check. */
	stresses: ContactStress[] | null;
	/** Contacts the vertical preload does not load (normal horizontal or pointing down). */
	unloaded: string[];
	allowableP0_MPa: number;
}

/** Input of checkGeometry. */
export interface GeometryCheckInput {
	contacts: Contact[];
	ballDiameter_mm: number;
	preload_N: number | null;
	ball: Material;
	seat: Material;
	allowableP0_MPa: number;
}

const fmt = (x: number, digits = 1) => {
	const v = Math.abs(x) < 0.5 * 10 ** -digits ? 0 : x;
	return v.toFixed(digits);
};
const fmtVec = (v: Vec3, digits = 1) => `(${v.map((x) => fmt(x, digits)).join(', ')})`;

/** "vertical", "horizontal" or "inclined" for a unit direction (z up). */
export function orientationWord(direction: Vec3): 'vertical' | 'horizontal' | 'inclined' {
	const z = Math.abs(unit(direction)[2]);
	if (z > 1 - 1e-6) return 'vertical';
	if (z < 1e-6) return 'horizontal';
	return 'inclined';
}

/** A freedom twist in plain words, e.g. "rotation about a vertical axis through (0.0, -100.0, 0.0) mm". */
export function twistToWords(t: Twist): string {
	const d = unit(t.direction);
	const o = orientationWord(d);
	if (t.kind === 'translation') return `translation along ${fmtVec(d, 3)} (${o})`;
	const where = `through ${fmtVec(t.point ?? [0, 0, 0])} mm along ${fmtVec(d, 3)}`;
	const axis = `${o === 'inclined' ? 'an inclined' : `a ${o}`} axis ${where}`;
	if (t.kind === 'rotation') return `rotation about ${axis}`;
	return `screw motion about ${axis}, advancing ${fmt(t.pitch ?? 0, 3)} mm per radian`;
}

/**
 * Plain-language reading of the condition number of the length-scaled constraint matrix. The
 * bands are common practice for engineering judgement, not from a standard.
 */
export function conditionReading(k: number): string {
	if (!Number.isFinite(k)) return 'singular: some motion is not held at all';
	if (k < 10) return 'well conditioned: the contacts hold every direction about equally firmly';
	if (k <= 100) return 'fair: some directions are held noticeably less firmly than others';
	return 'nearly singular: some direction is barely held; small errors can move the seat a lot';
}

/**
 * Ball centres from contacts: each contact lies one ball radius from its centre against the normal
 * (point = centre − n̂·D/2). Centres closer than a thousandth of a ball radius are one ball.
 */
export function ballCentres(contacts: Contact[], ballDiameter_mm: number): Vec3[] {
	const r = ballDiameter_mm / 2;
	const out: Vec3[] = [];
	for (const c of contacts) {
		const centre = add(c.point, scale(unit(c.normal), r));
		if (!out.some((o) => norm(sub(o, centre)) <= 1e-3 * Math.max(r, 1e-3))) out.push(centre);
	}
	return out;
}

/**
 * Normal load per contact under a vertical preload shared equally by the balls and, within a ball,
 * equally in its vertical component: N = F_ball / (k cos θ). null for contacts the preload cannot
 * load (cos θ ≤ 0.01).
 */
export function contactLoads(
	contacts: Contact[],
	ballDiameter_mm: number,
	preload_N: number
): (number | null)[] {
	const centres = ballCentres(contacts, ballDiameter_mm);
	const r = ballDiameter_mm / 2;
	const ballOf = contacts.map((c) => {
		const centre = add(c.point, scale(unit(c.normal), r));
		let best = 0;
		centres.forEach((o, i) => {
			if (norm(sub(o, centre)) < norm(sub(centres[best], centre))) best = i;
		});
		return best;
	});
	const perBall = preload_N / Math.max(centres.length, 1);
	return contacts.map((c, i) => {
		const cos = dot(unit(c.normal), [0, 0, 1]);
		const k = ballOf.filter(
			(b, j) => b === ballOf[i] && dot(unit(contacts[j].normal), [0, 0, 1]) > 0.01
		).length;
		return cos > 0.01 ? perBall / (k * cos) : null;
	});
}

/** Constraint status, freedoms in words, ball positions and Hertz stress per contact. */
export function checkGeometry(input: GeometryCheckInput): GeometryReport {
	const analysis = analyzeConstraints(input.contacts);
	const labels = input.contacts.map((c, i) => c.label ?? `contact ${i + 1}`);
	const stresses: ContactStress[] = [];
	const unloaded: string[] = [];
	if (input.preload_N !== null && input.preload_N > 0) {
		const loads = contactLoads(input.contacts, input.ballDiameter_mm, input.preload_N);
		loads.forEach((load, i) => {
			if (load === null) {
				unloaded.push(labels[i]);
				return;
			}
			const h = hertzBallOnFlat({
				ballDiameter_mm: input.ballDiameter_mm,
				load_N: load,
				ball: input.ball,
				flat: input.seat
			});
			stresses.push({
				label: labels[i],
				load_N: load,
				a_mm: h.a_mm,
				p0_MPa: h.p0_MPa,
				approach_um: h.approach_um,
				stiffness_N_per_um: h.stiffness_N_per_um,
				margin_MPa: input.allowableP0_MPa - h.p0_MPa,
				utilisation: h.p0_MPa / input.allowableP0_MPa
			});
		});
	}
	return {
		status: analysis.status,
		dof: analysis.dof,
		redundant: analysis.redundant,
		rank: analysis.rank,
		contactCount: analysis.contacts,
		conditionNumber: analysis.conditionNumber,
		conditionWords: conditionReading(analysis.conditionNumber),
		freedoms: analysis.freedoms.map((t) => ({
			kind: t.kind,
			words: twistToWords(t),
			direction: unit(t.direction),
			point: t.point ?? null
		})),
		contacts: input.contacts.map((c, i) => ({ ...c, label: labels[i] })),
		balls: ballCentres(input.contacts, input.ballDiameter_mm).map((centre, i) => ({
			label: `Ball ${i + 1}`,
			centre
		})),
		ballDiameter_mm: input.ballDiameter_mm,
		stresses: input.preload_N !== null && input.preload_N > 0 ? stresses : null,
		unloaded,
		allowableP0_MPa: input.allowableP0_MPa
	};
}

/** The two drawing planes of the diagram: top (x right, y up) and side (x right, z up). */
export type DiagramView = 'top' | 'side';

/** Project a model point to SVG coordinates of a view (SVG y grows downwards). */
export function project(p: Vec3, view: DiagramView): [number, number] {
	return view === 'top' ? [p[0], -p[1]] : [p[0], -p[2]];
}

/**
 * A model line (through `point` along `direction`) drawn in a view: a segment ± halfLength about
 * the point, or `null` when it is seen end-on (projects to a point).
 */
export function projectLine(
	point: Vec3,
	direction: Vec3,
	halfLength: number,
	view: DiagramView
): { from: [number, number]; to: [number, number] } | null {
	const d = unit(direction);
	const seen = view === 'top' ? Math.hypot(d[0], d[1]) : Math.hypot(d[0], d[2]);
	if (seen < 1e-6) return null;
	return {
		from: project(sub(point, scale(d, halfLength)), view),
		to: project(add(point, scale(d, halfLength)), view)
	};
}
