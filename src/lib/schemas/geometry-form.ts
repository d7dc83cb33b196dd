/**
 * The geometry page's form values: what to show for a saved version or for a fixture with none
 * yet, and the check run on submitted values. Pure (no I/O), so the page's load and actions only
 * fetch, call these and shape the answer.
 */
import { DomainInputError } from '../domain/errors';
import { checkGeometry } from '../domain/geometry-check';
import {
	GEOMETRY_DEFAULTS,
	MATERIAL_CHOICES,
	geometryFieldErrors,
	geometryFormSchema,
	geometryInput
} from './geometry';

/** One row of the contacts table as the form holds it (text fields). */
export type GeometryRow = Record<'px' | 'py' | 'pz' | 'nx' | 'ny' | 'nz' | 'label', string>;

/** A stored material: one of the listed choices or custom E and ν. */
export type StoredMaterial = { name?: string; E_GPa: number; nu: number } | null;

/** What of a saved geometry version the form shows. */
export interface SavedGeometry {
	kind: string;
	params: Record<string, number> | null;
	contacts: { point: number[]; normal: number[]; label?: string }[];
	ballDiameter_mm: number | null;
	preload_N: number | null;
	ballMaterial: StoredMaterial;
	seatMaterial: StoredMaterial;
}

/** What of the register's record the form starts from when nothing is saved yet. */
export interface GeometryFixtureFacts {
	type: string;
	ballDiameter_mm: number | null;
	preload_N: number | null;
	ballMaterial: string | null;
	seatMaterial: string | null;
}

/** Guess a material choice from the register's free-text material (e.g. "Si3N4"). */
export function materialFromText(text: string | null): string {
	const t = (text ?? '').toLowerCase();
	if (/si3n4|nitride/.test(t)) return 'silicon-nitride';
	if (/carbide|\bwc\b/.test(t) && !/silicon/.test(t)) return 'tungsten-carbide';
	if (/\bsic\b|silicon carbide/.test(t)) return 'silicon-carbide';
	if (/alumina|al2o3/.test(t)) return 'alumina';
	if (/440/.test(t)) return 'steel-440c';
	return 'steel-52100';
}

/** Form fields for a stored material: the matching choice, or custom E and ν. */
export function materialFields(side: 'ball' | 'seat', m: StoredMaterial): Record<string, string> {
	if (!m) return {};
	const hit = MATERIAL_CHOICES.find((c) => c.E_GPa === m.E_GPa && c.nu === m.nu);
	if (hit) return { [`${side}Material`]: hit.key };
	return {
		[`${side}Material`]: 'custom',
		[`${side}E_GPa`]: String(m.E_GPa),
		[`${side}Nu`]: String(m.nu)
	};
}

const str = (x: number | null | undefined) => (x === null || x === undefined ? '' : String(x));

/** The form as a saved version fills it: values, and table rows for a table geometry. */
export function formFromSaved(saved: SavedGeometry): {
	values: Record<string, string>;
	rows: GeometryRow[];
} {
	const p = saved.params ?? {};
	const values = {
		...GEOMETRY_DEFAULTS,
		kind: saved.kind,
		ballCircleRadius_mm: str(p.ballCircleRadius_mm),
		contactAngle_deg: str(p.contactAngle_deg),
		grooveYaw_deg: str(p.grooveYaw_deg ?? 0),
		omitBall: str(p.omitBall),
		ballDiameter_mm: str(saved.ballDiameter_mm),
		preload_N: str(saved.preload_N),
		allowableP0_MPa: str(p.allowableP0_MPa ?? Number(GEOMETRY_DEFAULTS.allowableP0_MPa)),
		...materialFields('ball', saved.ballMaterial),
		...materialFields('seat', saved.seatMaterial)
	};
	const rows =
		saved.kind === 'table'
			? saved.contacts.map((c) => ({
					px: str(c.point[0]),
					py: str(c.point[1]),
					pz: str(c.point[2]),
					nx: str(c.normal[0]),
					ny: str(c.normal[1]),
					nz: str(c.normal[2]),
					label: c.label ?? ''
				}))
			: [];
	return { values, rows };
}

/** The form for a fixture with no saved geometry: its type's layout and its register facts. */
export function formFromFixture(f: GeometryFixtureFacts): Record<string, string> {
	return {
		...GEOMETRY_DEFAULTS,
		kind: f.type === 'trihedral-vee-flat' ? 'trihedral-vee-flat' : 'three-vee',
		ballDiameter_mm: str(f.ballDiameter_mm) || GEOMETRY_DEFAULTS.ballDiameter_mm,
		preload_N: str(f.preload_N) || GEOMETRY_DEFAULTS.preload_N,
		ballMaterial: materialFromText(f.ballMaterial),
		seatMaterial: materialFromText(f.seatMaterial)
	};
}

/** Runs the check on raw form values: field errors, or the report and the parsed form. */
export function evaluateGeometryForm(values: Record<string, string>, rows: GeometryRow[]) {
	const parsed = geometryFormSchema.safeParse({
		...values,
		rows: values.kind === 'table' ? rows : undefined
	});
	if (!parsed.success)
		return { errors: geometryFieldErrors(parsed.error), report: null, form: null };
	try {
		const report = checkGeometry(geometryInput(parsed.data));
		return { errors: null, report, form: parsed.data };
	} catch (e) {
		if (e instanceof DomainInputError) {
			return { errors: { _form: e.message }, report: null, form: null };
		}
		throw e;
	}
}
