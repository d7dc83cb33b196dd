/** What the history API and the fixture page's timeline show: plain types, no I/O. */
import type { EventKind } from '../domain/events';

/** One logged event as the history API returns it. */
export interface HistoryEntry {
	id: string;
	kind: string;
	occurredAt: string;
	receivedAt: string;
	deviceId: string;
	payload: Record<string, unknown>;
	user: { id: string; name: string; email: string | null };
}

/** A fixture's history page: which fixture, and its newest events. */
export interface FixtureHistory {
	fixture: { code: string; name: string };
	events: HistoryEntry[];
}

/** One page of a fixture's timeline. */
export interface TimelinePage {
	events: HistoryEntry[];
	/** Cursor of the next older page; null when this page reaches the first entry. */
	older: string | null;
	/** How many events of each kind the fixture has (for the filter). */
	kinds: Partial<Record<EventKind, number>>;
}
