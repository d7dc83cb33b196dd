/**
 * The fleet board as its pages and API see it: plain types shared by $lib/server/fleet and the
 * components, so components never import server code.
 */
import type { FixtureStatus, FixtureType, FlagKind } from './fixture';
import type { FleetQuery } from './fleet';

/** One open flag as the board shows it: the reason in words and the figures behind it. */
export interface BoardFlag {
	id: number;
	kind: FlagKind;
	reason: string;
	figures: Record<string, number | string | null> | null;
	raisedAt: string;
}

/** The latest entry logged on a fixture, and who logged it. */
export interface LastEntry {
	kind: string;
	occurredAt: string;
	by: string | null;
}

/** A fixture with open flags: one row of "Needs attention" (and of a technician's list). */
export interface AttentionRow {
	code: string;
	name: string;
	type: FixtureType;
	status: FixtureStatus;
	site: string;
	area: { id: number; name: string };
	location: string;
	/** Open flags, most urgent first. */
	flags: BoardFlag[];
	/** When the oldest of the open flags was raised. */
	oldestRaisedAt: string;
	lastEntry: LastEntry | null;
}

/** Open flags of one kind across the (filtered) fleet. */
export interface KindCount {
	kind: FlagKind;
	count: number;
}

/** What GET /api/fleet/summary answers and the board's first paint shows. */
export interface FleetSummary {
	generatedAt: string;
	query: FleetQuery;
	/** Fixtures with an open flag of each kind, most urgent kind first (every kind, zeros too). */
	today: KindCount[];
	/** Fixtures on hold. */
	onHold: number;
	/** Fixtures whose latest saved coupling geometry is not exactly constrained. */
	notExact: number;
	attention: {
		/** Fixtures that match the filters and have an open flag. */
		total: number;
		/** The page asked for (query.page) and its size. */
		page: number;
		pageSize: number;
		/** That page of them, the most urgent first. */
		rows: AttentionRow[];
	};
}

/** The board's icons: one per flag kind, and its other counts. */
export type BoardIconName = FlagKind | 'on-hold' | 'geometry';

/** Rows per page of "Needs attention". */
export const ATTENTION_PAGE_SIZE = 100;
