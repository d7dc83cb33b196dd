/**
 * Hertz contact of the ball-and-seat pairs found in kinematic couplings.
 *
 * Sources: Johnson, Contact Mechanics (CUP 1985) §3.4 (circular) and §4.2 (elliptical) [equation
 * numbers from memory]; Roark's Formulas for Stress and Strain, Table 14.1; Hamrock & Brewe,
 * J. Lubr. Technol. 105:171 (1983) for the approximate elliptical formulas; ISO 76:2006 for the
 * 4200 MPa static contact-pressure screening limit.
 *
 * Units at the boundary: mm, N, GPa in; mm, MPa, µm, N/µm out. SI inside.
 * Effective modulus 1/E* = (1−ν₁²)/E₁ + (1−ν₂²)/E₂; a concave seat has a negative radius.
 */
import { DomainInputError, requireFinite, requirePositive } from './errors';
import { ellipticKE } from './elliptic';
import { circularMaxShear, ellipticalMaxShear } from './subsurface';
import { rad } from './vec';

/** Elastic constants of a contact body. */
export interface Material {
	E_GPa: number;
	nu: number;
	name?: string;
}

/** Size, pressure, approach, stiffness and subsurface shear of one Hertz contact. */
export interface HertzContact {
	/** Contact semi-axis (mm); for an ellipse the one across the groove (the larger). */
	a_mm: number;
	/** The other semi-axis (mm); equal to a_mm for a circular contact. */
	b_mm: number;
	p0_MPa: number;
	meanPressure_MPa: number;
	/** Approach of distant points of the two bodies (µm). */
	approach_um: number;
	/** Normal contact stiffness dF/dδ (N/µm). */
	stiffness_N_per_um: number;
	/** Largest subsurface shear stress, the larger of the two bodies (MPa). */
	maxShear_MPa: number;
	/** Depth of that shear stress below the surface (mm). */
	maxShearDepth_mm: number;
	/** Largest shear and its depth in each body (they differ through ν). */
	bodies: { body: string; nu: number; maxShear_MPa: number; maxShearDepth_mm: number }[];
	/** Effective modulus E* (GPa). */
	effectiveModulus_GPa: number;
	/** Normal load on this contact (N). */
	load_N: number;
}

/** Elastic constants of common ball and seat materials, with where each value comes from. */
export const MATERIALS = {
	'steel-52100': { E_GPa: 210, nu: 0.3, name: 'AISI 52100 steel, hardened' },
	'silicon-nitride': { E_GPa: 310, nu: 0.27, name: 'Silicon nitride, bearing grade' },
	alumina: { E_GPa: 375, nu: 0.22, name: 'Alumina 99.5 %' },
	'silicon-carbide': { E_GPa: 410, nu: 0.14, name: 'Silicon carbide' },
	'tungsten-carbide': { E_GPa: 620, nu: 0.22, name: 'Tungsten carbide (WC-Co)' },
	'steel-440c': { E_GPa: 200, nu: 0.28, name: 'AISI 440C stainless, hardened' }
} as const satisfies Record<string, Material>;

/** Basis of each MATERIALS entry. */
export const MATERIAL_SOURCES: Record<keyof typeof MATERIALS, string> = {
	'steel-52100': 'supplier datasheets give 190–210 GPa and ν 0.27–0.30',
	'silicon-nitride': 'supplier datasheets for bearing-grade Si₃N₄',
	alumina: 'supplier datasheets for 99.5 % Al₂O₃',
	'silicon-carbide': 'supplier datasheets for sintered SiC',
	'tungsten-carbide': 'from memory: 600–650 GPa, ν 0.22 for common WC-Co grades',
	'steel-440c': 'from memory: about 200 GPa, ν 0.28'
};

/** ISO 76:2006 allowable static contact pressure for ball bearings (not self-aligning), MPa. */
export const ISO76_BALL_LIMIT_MPA = 4200;

function checkMaterial(m: Material, field: string): Material {
	if (m === null || typeof m !== 'object') {
		throw new DomainInputError(field, 'must be a material { E_GPa, nu }');
	}
	requirePositive(m.E_GPa, `${field}.E_GPa`);
	requireFinite(m.nu, `${field}.nu`);
	if (m.nu <= -1 || m.nu >= 0.5) {
		throw new DomainInputError(`${field}.nu`, `must be above −1 and below 0.5 (got ${m.nu})`);
	}
	return m;
}

/** E* in Pa from two materials. */
export function effectiveModulus(m1: Material, m2: Material): number {
	checkMaterial(m1, 'material 1');
	checkMaterial(m2, 'material 2');
	return 1 / ((1 - m1.nu * m1.nu) / (m1.E_GPa * 1e9) + (1 - m2.nu * m2.nu) / (m2.E_GPa * 1e9));
}

interface Body {
	body: string;
	material: Material;
}

function shearInBodies(
	bodies: Body[],
	p0: number,
	shear: (nu: number) => { tau: number; depth: number },
	depthUnit: number
) {
	const byNu = new Map<number, { tau: number; depth: number }>();
	const out = bodies.map(({ body, material }) => {
		let s = byNu.get(material.nu);
		if (!s) {
			s = shear(material.nu);
			byNu.set(material.nu, s);
		}
		return {
			body,
			nu: material.nu,
			maxShear_MPa: (s.tau * p0) / 1e6,
			maxShearDepth_mm: s.depth * depthUnit * 1e3
		};
	});
	const worst = out.reduce((x, y) => (y.maxShear_MPa > x.maxShear_MPa ? y : x));
	return { bodies: out, worst };
}

const shearCache = new Map<number, { tau: number; depth: number }>();
function cachedCircularShear(nu: number) {
	let hit = shearCache.get(nu);
	if (!hit) {
		hit = circularMaxShear(nu);
		if (shearCache.size > 64) shearCache.clear();
		shearCache.set(nu, hit);
	}
	return hit;
}

const ellipseCache = new Map<string, { tau: number; depth: number }>();
/** τ_max/p0 and depth/b below an ellipse depend only on b/a and ν: computed once per pair. */
function cachedEllipticalShear(ratio: number, nu: number) {
	const key = `${ratio.toPrecision(12)}|${nu}`;
	let hit = ellipseCache.get(key);
	if (!hit) {
		const s = ellipticalMaxShear(1, ratio, nu);
		hit = { tau: s.tau, depth: s.depth / ratio };
		if (ellipseCache.size > 256) ellipseCache.clear();
		ellipseCache.set(key, hit);
	}
	return hit;
}

/** Circular Hertz contact for load F (N), effective radius R (m, positive), modulus E* (Pa). */
function circular(F: number, R: number, Estar: number, bodies: Body[]): HertzContact {
	const a = Math.cbrt((3 * F * R) / (4 * Estar));
	const p0 = (3 * F) / (2 * Math.PI * a * a);
	const delta = (a * a) / R;
	const { bodies: perBody, worst } = shearInBodies(bodies, p0, cachedCircularShear, a);
	return {
		a_mm: a * 1e3,
		b_mm: a * 1e3,
		p0_MPa: p0 / 1e6,
		meanPressure_MPa: p0 / 1.5e6,
		approach_um: delta * 1e6,
		stiffness_N_per_um: (2 * Estar * a) / 1e6,
		maxShear_MPa: worst.maxShear_MPa,
		maxShearDepth_mm: worst.maxShearDepth_mm,
		bodies: perBody,
		effectiveModulus_GPa: Estar / 1e9,
		load_N: F
	};
}

/** Ball on a flat: R = D/2. */
export function hertzBallOnFlat(p: {
	ballDiameter_mm: number;
	load_N: number;
	ball: Material;
	flat: Material;
}): HertzContact {
	const D = requirePositive(p.ballDiameter_mm, 'ballDiameter_mm') / 1e3;
	const F = requirePositive(p.load_N, 'load_N');
	checkMaterial(p.ball, 'ball');
	checkMaterial(p.flat, 'flat');
	return circular(F, D / 2, effectiveModulus(p.ball, p.flat), [
		{ body: 'ball', material: p.ball },
		{ body: 'flat', material: p.flat }
	]);
}

/** Two balls pressed together: 1/R = 2/D₁ + 2/D₂. */
export function hertzBallOnBall(p: {
	ballDiameter_mm: number;
	otherDiameter_mm: number;
	load_N: number;
	ball: Material;
	other: Material;
}): HertzContact {
	const D1 = requirePositive(p.ballDiameter_mm, 'ballDiameter_mm') / 1e3;
	const D2 = requirePositive(p.otherDiameter_mm, 'otherDiameter_mm') / 1e3;
	const F = requirePositive(p.load_N, 'load_N');
	checkMaterial(p.ball, 'ball');
	checkMaterial(p.other, 'other');
	const R = 1 / (2 / D1 + 2 / D2);
	return circular(F, R, effectiveModulus(p.ball, p.other), [
		{ body: 'ball', material: p.ball },
		{ body: 'other', material: p.other }
	]);
}

/** Ball in a concave spherical seat of radius Rs > D/2: 1/R = 2/D − 1/Rs. */
export function hertzBallInSeat(p: {
	ballDiameter_mm: number;
	seatRadius_mm: number;
	load_N: number;
	ball: Material;
	seat: Material;
}): HertzContact {
	const D = requirePositive(p.ballDiameter_mm, 'ballDiameter_mm') / 1e3;
	const Rs = requirePositive(p.seatRadius_mm, 'seatRadius_mm') / 1e3;
	const F = requirePositive(p.load_N, 'load_N');
	checkMaterial(p.ball, 'ball');
	checkMaterial(p.seat, 'seat');
	if (Rs <= D / 2) {
		throw new DomainInputError(
			'seatRadius_mm',
			`must be larger than the ball radius ${(D * 500).toPrecision(4)} mm (got ${p.seatRadius_mm})`
		);
	}
	const R = 1 / (2 / D - 1 / Rs);
	return circular(F, R, effectiveModulus(p.ball, p.seat), [
		{ body: 'ball', material: p.ball },
		{ body: 'seat', material: p.seat }
	]);
}

/** Angle (rad) between a flank normal and the vertical for a vee of the given included angle. */
function flankAngle(includedAngle_deg: number): number {
	requireFinite(includedAngle_deg, 'includedAngle_deg');
	if (includedAngle_deg <= 0 || includedAngle_deg >= 180) {
		throw new DomainInputError(
			'includedAngle_deg',
			`must be between 0 and 180 degrees (got ${includedAngle_deg})`
		);
	}
	return rad(90 - includedAngle_deg / 2);
}

/**
 * Ball in a symmetric flat-flanked vee under a vertical load: each flank is a ball-on-flat contact
 * with N = F / (2 cos θ), θ = 90° − included/2; vertical stiffness 2 k_n cos²θ.
 */
export function hertzBallInVee(p: {
	ballDiameter_mm: number;
	verticalLoad_N: number;
	includedAngle_deg: number;
	ball: Material;
	seat: Material;
}): { flankLoad_N: number; flank: HertzContact; verticalStiffness_N_per_um: number } {
	requirePositive(p.verticalLoad_N, 'verticalLoad_N');
	const theta = flankAngle(p.includedAngle_deg);
	const N = p.verticalLoad_N / (2 * Math.cos(theta));
	const flank = hertzBallOnFlat({
		ballDiameter_mm: p.ballDiameter_mm,
		load_N: N,
		ball: p.ball,
		flat: p.seat
	});
	flank.bodies = flank.bodies.map((b) => (b.body === 'flat' ? { ...b, body: 'seat' } : b));
	return {
		flankLoad_N: N,
		flank,
		verticalStiffness_N_per_um: 2 * flank.stiffness_N_per_um * Math.cos(theta) ** 2
	};
}

/** Semi-axes, p0 and approach of an elliptical contact, before the subsurface shear. */
interface EllipseCore {
	a: number;
	b: number;
	p0: number;
	delta: number;
}

/**
 * Exact elliptical Hertz contact (Johnson 1985 §4.2): with A ≤ B the half curvature sums,
 * B/A = (k² − S)/(k'² S) fixes the eccentricity (k' = b/a), then a³ = 3F·K·S / (2π A E* k²),
 * p0 = 3F/(2πab) and δ = p0·b·K/E*.
 */
function ellipseExact(F: number, A: number, B: number, Estar: number): EllipseCore {
	const ratio = B / A;
	if (ratio - 1 < 1e-12) {
		const R = 1 / (2 * A);
		const a = Math.cbrt((3 * F * R) / (4 * Estar));
		return { a, b: a, p0: (3 * F) / (2 * Math.PI * a * a), delta: (a * a) / R };
	}
	if (ratio > 1e10) {
		throw new DomainInputError('geometry', 'the contact is too close to a line contact to solve');
	}
	const ratioOf = (kp: number) => {
		const k2 = 1 - kp * kp;
		const { S } = ellipticKE(Math.sqrt(k2), kp);
		return (k2 - S) / (kp * kp * S);
	};
	// ratioOf falls from ∞ (k' → 0) to 1 (k' → 1); bisect on ln k'.
	let lo = Math.log(1e-12);
	let hi = 0;
	for (let i = 0; i < 200 && hi - lo > 1e-15; i++) {
		const mid = (lo + hi) / 2;
		if (ratioOf(Math.exp(mid)) > ratio) lo = mid;
		else hi = mid;
	}
	const kp = Math.exp((lo + hi) / 2);
	const k2 = 1 - kp * kp;
	const { K, S } = ellipticKE(Math.sqrt(k2), kp);
	const a = Math.cbrt((3 * F * K * S) / (2 * Math.PI * A * Estar * k2));
	const b = a * kp;
	const p0 = (3 * F) / (2 * Math.PI * a * b);
	return { a, b, p0, delta: (p0 * b * K) / Estar };
}

/**
 * Hamrock & Brewe (1983) approximations [constants from memory]: with R_y ≥ R_x, α = R_y/R_x,
 * k̄ = 1.0339 α^0.6360, Ē = 1.0003 + 0.5968/α, F̄ = 1.5277 + 0.6023 ln α, 1/R = 1/R_x + 1/R_y,
 * E' = 2E*: 2a = 2(6k̄²ĒFR/(πE'))^⅓, 2b = 2(6ĒFR/(πk̄E'))^⅓, δ = F̄[(9/(2ĒR))(F/(πk̄E'))²]^⅓.
 */
function ellipseApprox(F: number, Rx: number, Ry: number, Estar: number): EllipseCore {
	const alpha = Ry / Rx;
	const k = 1.0339 * alpha ** 0.636;
	const Ebar = 1.0003 + 0.5968 / alpha;
	const Fbar = 1.5277 + 0.6023 * Math.log(alpha);
	const R = 1 / (1 / Rx + 1 / Ry);
	const Ep = 2 * Estar;
	const a = Math.cbrt((6 * k * k * Ebar * F * R) / (Math.PI * Ep));
	const b = Math.cbrt((6 * Ebar * F * R) / (Math.PI * k * Ep));
	const delta = Fbar * Math.cbrt((9 / (2 * Ebar * R)) * (F / (Math.PI * k * Ep)) ** 2);
	return { a, b, p0: (3 * F) / (2 * Math.PI * a * b), delta };
}

/**
 * Ball in a groove whose flanks are concave cylinders of radius grooveRadius (a single-arc groove
 * when contactAngle is 0, a Gothic arch otherwise). Each flank contact is elliptical, its long
 * semi-axis a_mm across the groove. With contactAngle θ > 0 there are two flanks, each carrying
 * F / (2 cos θ); with θ = 0 the single contact carries F.
 */
export function hertzBallInGroove(p: {
	ballDiameter_mm: number;
	grooveRadius_mm: number;
	contactAngle_deg: number;
	verticalLoad_N: number;
	ball: Material;
	seat: Material;
	method?: 'exact' | 'approximate';
}): { flankLoad_N: number; flank: HertzContact } {
	const D = requirePositive(p.ballDiameter_mm, 'ballDiameter_mm') / 1e3;
	const Rg = requirePositive(p.grooveRadius_mm, 'grooveRadius_mm') / 1e3;
	const F = requirePositive(p.verticalLoad_N, 'verticalLoad_N');
	requireFinite(p.contactAngle_deg, 'contactAngle_deg');
	if (p.contactAngle_deg < 0 || p.contactAngle_deg >= 90) {
		throw new DomainInputError(
			'contactAngle_deg',
			`must be from 0 up to (not including) 90 degrees (got ${p.contactAngle_deg})`
		);
	}
	checkMaterial(p.ball, 'ball');
	checkMaterial(p.seat, 'seat');
	const method = p.method ?? 'exact';
	if (method !== 'exact' && method !== 'approximate') {
		throw new DomainInputError('method', "must be 'exact' or 'approximate'");
	}
	const rb = D / 2;
	if (Rg <= rb * (1 + 1e-9)) {
		throw new DomainInputError(
			'grooveRadius_mm',
			`must be larger than the ball radius ${(rb * 1e3).toPrecision(4)} mm (got ${p.grooveRadius_mm})`
		);
	}
	const theta = rad(p.contactAngle_deg);
	const N = theta === 0 ? F : F / (2 * Math.cos(theta));
	const Estar = effectiveModulus(p.ball, p.seat);
	// Along the groove only the ball curves; across it the concave groove opposes the ball.
	const Ralong = rb;
	const Racross = 1 / (1 / rb - 1 / Rg);
	const core =
		method === 'exact'
			? ellipseExact(N, 1 / (2 * Racross), 1 / (2 * Ralong), Estar)
			: ellipseApprox(N, Ralong, Racross, Estar);
	const bodies: Body[] = [
		{ body: 'ball', material: p.ball },
		{ body: 'seat', material: p.seat }
	];
	const shear = shearInBodies(
		bodies,
		core.p0,
		(nu) => cachedEllipticalShear(core.b / core.a, nu),
		core.b
	);
	return {
		flankLoad_N: N,
		flank: {
			a_mm: core.a * 1e3,
			b_mm: core.b * 1e3,
			p0_MPa: core.p0 / 1e6,
			meanPressure_MPa: core.p0 / 1.5e6,
			approach_um: core.delta * 1e6,
			stiffness_N_per_um: (1.5 * N) / core.delta / 1e6,
			maxShear_MPa: shear.worst.maxShear_MPa,
			maxShearDepth_mm: shear.worst.maxShearDepth_mm,
			bodies: shear.bodies,
			effectiveModulus_GPa: Estar / 1e9,
			load_N: N
		}
	};
}

/** Result of allowableLoad. */
export interface AllowableLoad {
	/** Largest load (N) on the coupling contact: the vertical load for a vee. */
	load_N: number;
	/** Normal load (N) on each flank at that load (equal to load_N for a ball on a flat). */
	flankLoad_N: number;
	/** The peak-pressure limit used (MPa). */
	limit_MPa: number;
}

/**
 * Load at which a circular contact reaches peak pressure p0: F = p0³π³R²/(6E*²). For a vee, the
 * vertical load at which each flank reaches it. ISO 76's 4200 MPa is a screening limit here, not a
 * rating of the coupling.
 */
export function allowableLoad(p: {
	contact: 'ball-on-flat' | 'ball-in-vee';
	ballDiameter_mm: number;
	includedAngle_deg?: number;
	ball: Material;
	seat: Material;
	limit_MPa?: number;
}): AllowableLoad {
	const D = requirePositive(p.ballDiameter_mm, 'ballDiameter_mm') / 1e3;
	const limit = requirePositive(p.limit_MPa ?? ISO76_BALL_LIMIT_MPA, 'limit_MPa');
	const Estar = effectiveModulus(checkMaterial(p.ball, 'ball'), checkMaterial(p.seat, 'seat'));
	const p0 = limit * 1e6;
	const R = D / 2;
	const flankLoad = (p0 ** 3 * Math.PI ** 3 * R * R) / (6 * Estar * Estar);
	if (p.contact === 'ball-on-flat')
		return { load_N: flankLoad, flankLoad_N: flankLoad, limit_MPa: limit };
	if (p.contact !== 'ball-in-vee') {
		throw new DomainInputError('contact', "must be 'ball-on-flat' or 'ball-in-vee'");
	}
	const theta = flankAngle(p.includedAngle_deg ?? 90);
	return { load_N: flankLoad * 2 * Math.cos(theta), flankLoad_N: flankLoad, limit_MPa: limit };
}
