import {
	date,
	datetime,
	double,
	index,
	int,
	mysqlEnum,
	mysqlTable,
	text,
	uniqueIndex,
	varchar
} from 'drizzle-orm/mysql-core';
import { json } from './json';
import { FIXTURE_STATUSES } from '../../../domain/fixture-status';
import { FIXTURE_TYPES } from '../../../domain/fixture-types';
import { users } from './auth';

const createdAt = () =>
	datetime('created_at', { mode: 'date', fsp: 3 })
		.notNull()
		.$defaultFn(() => new Date());

/** A plant or building. */
export const sites = mysqlTable('sites', {
	id: int('id').autoincrement().primaryKey(),
	name: varchar('name', { length: 120 }).notNull().unique(),
	timezone: varchar('timezone', { length: 64 }).notNull().default('UTC'),
	createdAt: createdAt()
});

/** A bay, lab or room inside a site. */
export const areas = mysqlTable(
	'areas',
	{
		id: int('id').autoincrement().primaryKey(),
		siteId: int('site_id')
			.notNull()
			.references(() => sites.id),
		name: varchar('name', { length: 120 }).notNull(),
		createdAt: createdAt()
	},
	(t) => [uniqueIndex('areas_site_name_uq').on(t.siteId, t.name)]
);

/** A machine, bench or crib shelf where fixtures live. */
export const locations = mysqlTable(
	'locations',
	{
		id: int('id').autoincrement().primaryKey(),
		areaId: int('area_id')
			.notNull()
			.references(() => areas.id),
		name: varchar('name', { length: 120 }).notNull(),
		createdAt: createdAt()
	},
	(t) => [uniqueIndex('locations_area_name_uq').on(t.areaId, t.name)]
);

/**
 * Health-rule settings. One row per fixture type is the default for that type (fixtureType set);
 * rows without a type are named policy classes a fixture can point at. Column names mirror the
 * domain's `Policy` so the two stay one-to-one. Defaults and their sources live in
 * `$lib/domain/policy.ts`.
 */
export const policies = mysqlTable('policies', {
	id: int('id').autoincrement().primaryKey(),
	name: varchar('name', { length: 120 }).notNull().unique(),
	fixtureType: mysqlEnum('fixture_type', FIXTURE_TYPES).unique(),
	repeatabilitySpec_um: double('repeatability_spec_um').notNull(),
	repeatabilityWindow: int('repeatability_window').notNull(),
	breakInMinCycles: int('break_in_min_cycles').notNull(),
	settleWindow: int('settle_window').notNull(),
	settleTolerance_um: double('settle_tolerance_um').notNull(),
	cleaningIntervalCycles: int('cleaning_interval_cycles'),
	cleaningIntervalDays: int('cleaning_interval_days'),
	inspectionIntervalCycles: int('inspection_interval_cycles'),
	inspectionIntervalDays: int('inspection_interval_days'),
	ratedLifeCycles: int('rated_life_cycles'),
	wearLimitGrade: int('wear_limit_grade').notNull(),
	forecastHorizonCycles: int('forecast_horizon_cycles').notNull(),
	planningHorizonDays: int('planning_horizon_days').notNull().default(14),
	notes: text('notes'),
	updatedAt: datetime('updated_at', { mode: 'date', fsp: 3 })
		.notNull()
		.$defaultFn(() => new Date()),
	updatedBy: varchar('updated_by', { length: 255 }).references(() => users.id)
});

/** One fixture or coupling in the register; `code` is what its QR label carries. */
export const fixtures = mysqlTable(
	'fixtures',
	{
		id: int('id').autoincrement().primaryKey(),
		code: varchar('code', { length: 16 }).notNull().unique(),
		name: varchar('name', { length: 160 }).notNull(),
		type: mysqlEnum('type', FIXTURE_TYPES).notNull(),
		status: mysqlEnum('status', FIXTURE_STATUSES).notNull().default('in-service'),
		locationId: int('location_id')
			.notNull()
			.references(() => locations.id),
		/** A named policy class; null means the default policy of the fixture's type. */
		policyId: int('policy_id').references(() => policies.id),
		/** Per-fixture overrides of single policy fields (a partial `Policy`). */
		policyOverrides: json<Record<string, number | null>>('policy_overrides'),
		repeatabilitySpec_um: double('repeatability_spec_um'),
		ratedLifeCycles: int('rated_life_cycles'),
		ballMaterial: varchar('ball_material', { length: 80 }),
		seatMaterial: varchar('seat_material', { length: 80 }),
		ballDiameter_mm: double('ball_diameter_mm'),
		preload_N: double('preload_n'),
		/** Mass of the moving half, for the heavy-lift caution. */
		mass_kg: double('mass_kg'),
		commissionedOn: date('commissioned_on', { mode: 'string' }),
		notes: text('notes'),
		createdAt: createdAt(),
		createdBy: varchar('created_by', { length: 255 }).references(() => users.id),
		updatedAt: datetime('updated_at', { mode: 'date', fsp: 3 })
			.notNull()
			.$defaultFn(() => new Date())
	},
	(t) => [
		index('fixtures_location_idx').on(t.locationId),
		index('fixtures_status_idx').on(t.status),
		index('fixtures_type_idx').on(t.type),
		index('fixtures_name_idx').on(t.name)
	]
);

/**
 * Contact geometry of a coupling, versioned: every save adds a row with the next version, so
 * a past constraint check can always be reproduced.
 */
export const couplingGeometries = mysqlTable(
	'coupling_geometries',
	{
		id: int('id').autoincrement().primaryKey(),
		fixtureId: int('fixture_id')
			.notNull()
			.references(() => fixtures.id),
		version: int('version').notNull(),
		/** 'three-vee' | 'trihedral-vee-flat' (parametric) or 'table' (explicit contacts). */
		kind: varchar('kind', { length: 32 }).notNull(),
		params: json<Record<string, number>>('params'),
		/** Contacts as `{ point, normal, label? }` in mm, generated or entered. */
		contacts: json<{ point: number[]; normal: number[]; label?: string }[]>('contacts').notNull(),
		ballDiameter_mm: double('ball_diameter_mm'),
		preload_N: double('preload_n'),
		ballMaterial: json<{ name?: string; E_GPa: number; nu: number }>('ball_material'),
		seatMaterial: json<{ name?: string; E_GPa: number; nu: number }>('seat_material'),
		/** Cached constraint status at save time, for the register's warning badge. */
		constraintStatus: varchar('constraint_status', { length: 20 }),
		createdAt: createdAt(),
		createdBy: varchar('created_by', { length: 255 }).references(() => users.id)
	},
	(t) => [uniqueIndex('coupling_geometries_fixture_version_uq').on(t.fixtureId, t.version)]
);
