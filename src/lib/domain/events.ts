/**
 * Event kinds and the shapes of their payloads: the sync contract between the phone's outbox and
 * the server, as plain constants and types. Kind names and field names here must not change
 * without a migration of stored events. `$lib/schemas/events` builds the zod schemas that check
 * these shapes at the boundary, and proves at compile time that its input types equal these.
 */
import type { InspectionVerdict, WearGrade, WearMark } from './wear';

/** The nine kinds of fixture event. */
export const EVENT_KINDS = [
	'reseat',
	'cleaning',
	'inspection',
	'break-in',
	'part-swap',
	'move',
	'hold',
	'release',
	'note'
] as const;
export type EventKind = (typeof EVENT_KINDS)[number];

/** Largest indicator reading accepted, µm (10 mm: anything bigger is a slip of the finger). */
export const MAX_READING_UM = 10_000;
/** Largest cycle count in one event. */
export const MAX_CYCLES_PER_EVENT = 100_000;
/** Most readings one break-in event carries. */
export const MAX_READINGS_PER_BREAK_IN = 10_000;

/** Cleaning methods (Nestmark's list; compressed air and solvents carry cautions in the UI). */
export const CLEANING_METHODS = [
	'dry-wipe',
	'solvent-wipe',
	'ultrasonic-bath',
	'air-blow',
	'other'
] as const;
export type CleaningMethod = (typeof CLEANING_METHODS)[number];

/** Parts a swap can replace. 'seats' covers vees, grooves, sockets and flats. */
export const SWAPPABLE_PARTS = ['balls', 'seats', 'preload', 'whole-fixture', 'other'] as const;
export type SwappablePart = (typeof SWAPPABLE_PARTS)[number];

/** One seating's indicator readings in µm; at least one axis. */
export interface EventReading {
	dx?: number;
	dy?: number;
	dz?: number;
}

/** One graded contact of an inspection. */
export interface InspectionContact {
	contact: string;
	grade: WearGrade;
	marks?: WearMark[];
}

/**
 * Payloads as sent: fields with a default (reseat cycles, inspection marks and photos, break-in
 * readings) may be left out, and the fold fills them in the way the schemas do. Every kind may
 * carry `workOrderId`, the work order the entry carries out (optional, so older phones' entries
 * stay valid); the fold ignores it, ingest applies it to the order (`$lib/server/ingest-work-orders`).
 */
export interface EventPayloadInputs {
	reseat: { cycles?: number; readings?: EventReading; workOrderId?: number };
	cleaning: {
		method: CleaningMethod;
		relubricated: boolean;
		lubricant?: string;
		note?: string;
		workOrderId?: number;
	};
	inspection: {
		contacts: InspectionContact[];
		verdict: InspectionVerdict;
		photoIds?: string[];
		note?: string;
		workOrderId?: number;
	};
	'break-in': { cycles: number; readings?: EventReading[]; note?: string; workOrderId?: number };
	'part-swap': {
		replaced: SwappablePart[];
		description?: string;
		note?: string;
		workOrderId?: number;
	};
	/** A move made in the register also names where the fixture was. */
	move: { locationId: string; fromLocationId?: string; note?: string; workOrderId?: number };
	hold: { reason: string; workOrderId?: number };
	release: { note?: string; workOrderId?: number };
	note: { text: string; workOrderId?: number };
}

/** A validated event as the computation core folds it. */
export type FixtureEvent = {
	[K in EventKind]: { id: string; kind: K; occurredAt: string; payload: EventPayloadInputs[K] };
}[EventKind];
