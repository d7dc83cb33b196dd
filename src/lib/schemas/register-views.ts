/**
 * The register as its pages see it: plain types shared by the services in $lib/server and the
 * components that show them, so components never import server code.
 */
import type { FixtureStatus, FixtureType, FlagKind } from './fixture';
import type { CsvColumn, CsvRowError } from './fixture-csv';
import type { HistoryEntry } from './history-views';
import type { LocationPath } from './places-views';
import type { EffectivePolicyEntry } from './policy-views';

/** All stored fields of a fixture, as the edit form and the API show them. */
export interface FixtureRecord {
	id: number;
	code: string;
	name: string;
	type: FixtureType;
	status: FixtureStatus;
	locationId: number;
	repeatabilitySpec_um: number | null;
	ratedLifeCycles: number | null;
	ballMaterial: string | null;
	seatMaterial: string | null;
	ballDiameter_mm: number | null;
	preload_N: number | null;
	mass_kg: number | null;
	commissionedOn: string | null;
	notes: string | null;
	createdAt: string;
	updatedAt: string;
}

/** One row of the register list. */
export interface FixtureListItem {
	id: number;
	code: string;
	name: string;
	type: FixtureType;
	status: FixtureStatus;
	place: LocationPath;
	openFlags: FlagKind[];
	updatedAt: string;
}

/** One page of the register, and how many fixtures match in all. */
export interface RegisterPage {
	items: FixtureListItem[];
	total: number;
	page: number;
	pageSize: number;
}

/** Everything the fixture page shows. */
export interface FixtureDetail extends FixtureRecord {
	place: LocationPath;
	createdBy: string | null;
	policy: EffectivePolicyEntry[];
	state: {
		eventCount: number;
		totalCycles: number;
		cyclesSinceCleaning: number;
		cyclesSinceInspection: number;
		cyclesSincePartSwap: number;
		repeatability_um: number | null;
		wearGrade: number | null;
		lastEventAt: string | null;
		lastCleaningAt: string | null;
		lastInspectionAt: string | null;
		updatedAt: string;
	} | null;
	openFlags: { id: number; kind: FlagKind; reason: string; raisedAt: string }[];
	recentEvents: HistoryEntry[];
}

/** One row of an import preview. */
export interface ImportPreviewRow {
	row: number;
	cells: Record<CsvColumn, string>;
	errors: CsvRowError[];
	/** Where the fixture will go, once the row is valid. */
	place: LocationPath | null;
}

/** What an import would do: nothing is written until `commitImport`. */
export interface ImportPreview {
	fileErrors: string[];
	rows: ImportPreviewRow[];
	/** Rows with at least one error. */
	errorRows: number;
	/** True when every row is valid and the file can be imported as a whole. */
	ready: boolean;
}
