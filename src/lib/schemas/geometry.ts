import { z } from 'zod';
import type { Contact } from '$lib/domain/constraints';
import { threeVeeContacts, trihedralVeeFlatContacts } from '$lib/domain/coupling-geometry';
import { ISO76_BALL_LIMIT_MPA, MATERIALS, MATERIAL_SOURCES } from '$lib/domain/hertz';
import { unicodeString } from './text';

/*
 * The coupling geometry form, shared by the page (field names, defaults) and its actions. Form
 * values arrive as strings; table rows arrive as parallel lists (px, py, pz, nx, ny, nz, label).
 */

/** How the contacts are described. */
export const GEOMETRY_KINDS = ['three-vee', 'trihedral-vee-flat', 'table'] as const;
export type GeometryKind = (typeof GEOMETRY_KINDS)[number];

export const GEOMETRY_KIND_LABELS: Record<GeometryKind, string> = {
	'three-vee': 'Three balls in three vees',
	'trihedral-vee-flat': 'Trihedral socket, vee and flat',
	table: 'Table of contact points and normals'
};

/** Material choices: the core's list with its sources, or custom E and ν. */
export const MATERIAL_CHOICES = [
	...Object.entries(MATERIALS).map(([key, m]) => ({
		key,
		label: `${m.name} (E ${m.E_GPa} GPa, ν ${m.nu})`,
		source: MATERIAL_SOURCES[key as keyof typeof MATERIALS],
		E_GPa: m.E_GPa as number,
		nu: m.nu as number
	})),
	{ key: 'custom', label: 'Other: enter E and ν', source: '', E_GPa: NaN, nu: NaN }
];

const PLAIN_NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

function toNumber(v: unknown): unknown {
	if (typeof v !== 'string') return v;
	const t = v.trim();
	if (t === '') return undefined;
	return PLAIN_NUMBER.test(t) ? Number(t) : t;
}

interface Range {
	label: string;
	unit?: string;
	min?: number;
	gt?: number;
	max?: number;
	lt?: number;
}

/** A required number field with messages that say what to enter. */
function num({ label, unit, min, gt, max, lt }: Range) {
	const u = unit === '°' ? '°' : unit ? ` ${unit}` : '';
	let n = z.number({
		error: (iss) =>
			iss.input === undefined
				? `Enter the ${label.toLowerCase()}.`
				: typeof iss.input === 'string' && /^[+-]?\d+,\d+$/.test(iss.input)
					? `Use a decimal point, not a comma: ${iss.input.replace(',', '.')}.`
					: `${label}: "${String(iss.input)}" is not a number.`
	});
	if (min !== undefined) n = n.min(min, `${label} must be at least ${min}${u}.`);
	if (gt !== undefined) n = n.gt(gt, `${label} must be more than ${gt}${u}.`);
	if (max !== undefined) n = n.max(max, `${label} must be at most ${max}${u}.`);
	if (lt !== undefined) n = n.lt(lt, `${label} must be less than ${lt}${u}.`);
	return z.preprocess(toNumber, n);
}

const materialKey = z.enum(MATERIAL_CHOICES.map((m) => m.key) as [string, ...string[]], {
	error: 'Choose a material.'
});

const contactRow = z.object({
	px: num({ label: 'x', unit: 'mm' }),
	py: num({ label: 'y', unit: 'mm' }),
	pz: num({ label: 'z', unit: 'mm' }),
	nx: num({ label: 'Normal x' }),
	ny: num({ label: 'Normal y' }),
	nz: num({ label: 'Normal z' }),
	label: unicodeString('A label').trim().max(60, 'A label can be at most 60 characters.').optional()
});

/** Everything the geometry form sends. */
export const geometryFormSchema = z
	.object({
		kind: z.enum(GEOMETRY_KINDS, { error: 'Choose how to describe the contacts.' }),
		ballCircleRadius_mm: num({
			label: 'Ball-circle radius',
			unit: 'mm',
			gt: 0,
			max: 5000
		}).optional(),
		contactAngle_deg: num({ label: 'Contact angle', unit: '°', gt: 0, lt: 90 }).optional(),
		grooveYaw_deg: num({ label: 'Groove yaw', unit: '°', min: -90, max: 90 }).optional(),
		omitBall: z.enum(['', '1', '2', '3']).optional(),
		rows: z.array(contactRow).max(24, 'At most 24 contacts.').optional(),
		ballDiameter_mm: num({ label: 'Ball diameter', unit: 'mm', gt: 0, max: 500 }),
		preload_N: num({ label: 'Preload', unit: 'N', gt: 0, max: 1e6 }),
		ballMaterial: materialKey,
		ballE_GPa: num({ label: 'Ball E', unit: 'GPa', gt: 0, max: 2000 }).optional(),
		ballNu: num({ label: 'Ball ν', gt: -1, lt: 0.5 }).optional(),
		seatMaterial: materialKey,
		seatE_GPa: num({ label: 'Seat E', unit: 'GPa', gt: 0, max: 2000 }).optional(),
		seatNu: num({ label: 'Seat ν', gt: -1, lt: 0.5 }).optional(),
		allowableP0_MPa: num({ label: 'Allowable peak pressure', unit: 'MPa', gt: 0, max: 20000 })
	})
	.superRefine((v, ctx) => {
		const need = (key: keyof typeof v, message: string) => {
			if (v[key] === undefined) ctx.addIssue({ code: 'custom', path: [key], message });
		};
		if (v.kind !== 'table') {
			need('ballCircleRadius_mm', 'Enter the ball-circle radius.');
			need('contactAngle_deg', 'Enter the contact angle.');
		}
		if (v.kind === 'table' && (v.rows?.length ?? 0) === 0) {
			ctx.addIssue({ code: 'custom', path: ['rows'], message: 'Enter at least one contact.' });
		}
		v.rows?.forEach((r, i) => {
			if (r.nx === 0 && r.ny === 0 && r.nz === 0) {
				ctx.addIssue({
					code: 'custom',
					path: ['rows', i, 'nx'],
					message: 'A normal cannot be all zeros.'
				});
			}
		});
		for (const side of ['ball', 'seat'] as const) {
			if (v[`${side}Material`] === 'custom') {
				need(`${side}E_GPa`, `Enter E for the custom ${side} material.`);
				need(`${side}Nu`, `Enter ν for the custom ${side} material.`);
			}
		}
	});
export type GeometryForm = z.infer<typeof geometryFormSchema>;

/** Defaults for a fixture with no saved geometry (ISO 76 limit for the allowable pressure). */
export const GEOMETRY_DEFAULTS: Record<string, string> = {
	kind: 'three-vee',
	ballCircleRadius_mm: '50',
	contactAngle_deg: '45',
	grooveYaw_deg: '0',
	omitBall: '',
	ballDiameter_mm: '12.7',
	preload_N: '300',
	ballMaterial: 'steel-52100',
	seatMaterial: 'steel-52100',
	allowableP0_MPa: String(ISO76_BALL_LIMIT_MPA)
};

/** Field messages keyed by path ("rows.2.nx" for a table cell). */
export function geometryFieldErrors(error: z.ZodError): Record<string, string> {
	const out: Record<string, string> = {};
	for (const issue of error.issues) {
		const key = issue.path.length ? issue.path.map(String).join('.') : '_form';
		out[key] ??= issue.message;
	}
	return out;
}

const ROW_KEYS = ['px', 'py', 'pz', 'nx', 'ny', 'nz', 'label'] as const;

/** Reads the form: scalar fields as strings, table rows from parallel lists, blank rows dropped. */
export function readGeometryForm(form: FormData): {
	values: Record<string, string>;
	rows: Record<(typeof ROW_KEYS)[number], string>[];
} {
	const values: Record<string, string> = {};
	for (const [k, v] of form) {
		if (typeof v === 'string' && !ROW_KEYS.includes(k as never)) values[k] = v;
	}
	const lists = ROW_KEYS.map((k) => form.getAll(k).map((v) => (typeof v === 'string' ? v : '')));
	const count = Math.max(...lists.map((l) => l.length));
	const rows: Record<(typeof ROW_KEYS)[number], string>[] = [];
	for (let i = 0; i < count; i++) {
		const row = Object.fromEntries(ROW_KEYS.map((k, j) => [k, lists[j][i] ?? ''])) as Record<
			(typeof ROW_KEYS)[number],
			string
		>;
		if (ROW_KEYS.slice(0, 6).some((k) => row[k].trim() !== '')) rows.push(row);
	}
	return { values, rows };
}

/** Material constants from a choice, or the custom E and ν. */
function materialOf(key: string, E?: number, nu?: number) {
	const m = MATERIAL_CHOICES.find((c) => c.key === key);
	if (!m || key === 'custom') return { name: 'Custom', E_GPa: E ?? NaN, nu: nu ?? NaN };
	return { name: m.label.replace(/ \(E .*$/, ''), E_GPa: m.E_GPa, nu: m.nu };
}

/** The contacts and Hertz inputs a valid form describes. */
export function geometryInput(f: GeometryForm) {
	const ballDiameter_mm = f.ballDiameter_mm;
	let contacts: Contact[];
	let params: Record<string, number>;
	if (f.kind === 'three-vee') {
		params = {
			ballCircleRadius_mm: f.ballCircleRadius_mm!,
			contactAngle_deg: f.contactAngle_deg!,
			grooveYaw_deg: f.grooveYaw_deg ?? 0
		};
		const omit = f.omitBall ? ((Number(f.omitBall) - 1) as 0 | 1 | 2) : undefined;
		if (omit !== undefined) params.omitBall = omit + 1;
		contacts = threeVeeContacts({
			ballCircleRadius_mm: f.ballCircleRadius_mm!,
			contactAngle_deg: f.contactAngle_deg!,
			grooveYaw_deg: f.grooveYaw_deg ?? 0,
			ballDiameter_mm,
			omitBall: omit
		});
	} else if (f.kind === 'trihedral-vee-flat') {
		params = { ballCircleRadius_mm: f.ballCircleRadius_mm!, contactAngle_deg: f.contactAngle_deg! };
		contacts = trihedralVeeFlatContacts({
			ballCircleRadius_mm: f.ballCircleRadius_mm!,
			contactAngle_deg: f.contactAngle_deg!,
			ballDiameter_mm
		});
	} else {
		params = {};
		contacts = (f.rows ?? []).map((r, i) => ({
			point: [r.px, r.py, r.pz],
			normal: [r.nx, r.ny, r.nz],
			label: r.label || `contact ${i + 1}`
		}));
	}
	params.allowableP0_MPa = f.allowableP0_MPa;
	return {
		params,
		contacts,
		ballDiameter_mm,
		preload_N: f.preload_N,
		ball: materialOf(f.ballMaterial, f.ballE_GPa, f.ballNu),
		seat: materialOf(f.seatMaterial, f.seatE_GPa, f.seatNu),
		allowableP0_MPa: f.allowableP0_MPa
	};
}
