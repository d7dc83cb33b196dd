/**
 * What a work order made from a flag starts with: the fixture, the action that answers the flag,
 * a due date from the fixture's policy (its planning horizon) and the flag's reason in the notes.
 * The planner's form shows the draft; createFromFlag (./work-orders.ts) stores it in one step.
 */
import { eq, or } from 'drizzle-orm';
import type { FlagKind } from '../domain/flag-kinds';
import { DEFAULT_POLICY } from '../domain/policy';
import {
	ACTION_FOR_FLAG,
	answersBallsAndSeats,
	dueOnForFlag,
	type WorkOrderAction,
	type WorkOrderPart
} from '../domain/work-orders';
import { db, type Db } from './db';
import { fixtures, flags, policies } from './db/schema';
import { indexPolicyRows, policyValues, resolvePolicy } from './policies';
import { WorkOrderError } from './work-order-errors';

/** The pre-filled fields of an order made from a flag. */
export interface WorkOrderDraft {
	fixtureCode: string;
	fixtureName: string;
	flagId: number;
	flagKind: FlagKind;
	/** Whether the flag is still open (a closed flag needs no order). */
	flagOpen: boolean;
	action: WorkOrderAction;
	dueOn: string;
	notes: string;
	parts: WorkOrderPart[];
}

/** Balls and seats as part lines, one set each, sized from the register where it knows. */
function contactParts(f: {
	ballMaterial: string | null;
	seatMaterial: string | null;
	ballDiameter_mm: number | null;
}): WorkOrderPart[] {
	const ball: WorkOrderPart = { description: 'Balls, one set', quantity: 1 };
	if (f.ballDiameter_mm !== null) ball.size = `Ø ${f.ballDiameter_mm} mm`;
	if (f.ballMaterial) ball.material = f.ballMaterial;
	const seat: WorkOrderPart = { description: 'Seats or vee inserts, one set', quantity: 1 };
	if (f.seatMaterial) seat.material = f.seatMaterial;
	return [ball, seat];
}

/**
 * The draft of an order answering flag `flagId` on `today` (YYYY-MM-DD); 404 when there is no
 * such flag. Reads the fixture's policy rows itself (two statements on `q`), so it can run
 * inside the caller's transaction without asking the pool for a second connection.
 */
export async function draftFromFlag(
	flagId: number,
	today: string,
	q: Db = db
): Promise<WorkOrderDraft> {
	const [row] = await q
		.select({
			kind: flags.kind,
			reason: flags.reason,
			clearedAt: flags.clearedAt,
			code: fixtures.code,
			name: fixtures.name,
			type: fixtures.type,
			policyId: fixtures.policyId,
			policyOverrides: fixtures.policyOverrides,
			repeatabilitySpec_um: fixtures.repeatabilitySpec_um,
			ratedLifeCycles: fixtures.ratedLifeCycles,
			ballMaterial: fixtures.ballMaterial,
			seatMaterial: fixtures.seatMaterial,
			ballDiameter_mm: fixtures.ballDiameter_mm
		})
		.from(flags)
		.innerJoin(fixtures, eq(fixtures.id, flags.fixtureId))
		.where(eq(flags.id, flagId));
	if (!row) throw new WorkOrderError(404, `There is no flag #${flagId}.`);
	const rows = await q
		.select()
		.from(policies)
		.where(
			or(
				eq(policies.fixtureType, row.type),
				row.policyId ? eq(policies.id, row.policyId) : undefined
			)
		);
	const policy = policyValues(resolvePolicy(row, indexPolicyRows(rows)));
	const horizon = policy.planningHorizonDays ?? DEFAULT_POLICY.planningHorizonDays;
	const pair = answersBallsAndSeats(row.kind);
	return {
		fixtureCode: row.code,
		fixtureName: row.name,
		flagId,
		flagKind: row.kind,
		flagOpen: row.clearedAt === null,
		action: ACTION_FOR_FLAG[row.kind],
		dueOn: dueOnForFlag(row.kind, today, horizon),
		notes: pair
			? `${row.reason}\nReplace the balls and the seats together: contacts wear as pairs.`
			: row.reason,
		parts: pair ? contactParts(row) : []
	};
}
