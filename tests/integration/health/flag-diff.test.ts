import { describe, expect, it } from 'vitest';
import type { Flag } from '$lib/domain/health';
import { diffFlags, flagRows, type FlagRow } from '$lib/server/state-store';

const at = new Date('2026-03-01T08:00:00.000Z');
const now = new Date('2026-03-02T08:00:00.000Z');

function open(kind: Flag['kind'], reason: string, figures: Flag['figures'] = {}): FlagRow {
	return {
		id: 7,
		fixtureId: 3,
		kind,
		reason,
		figures,
		raisedAt: at,
		raisedByEventId: 'e-1',
		clearedAt: null,
		clearedByEventId: null
	};
}

const flag = (kind: Flag['kind'], reason: string, figures: Flag['figures'] = {}) =>
	({ kind, reason, figures }) as Flag;

describe('diffFlags and flagRows', () => {
	it('raises new kinds, clears missing ones and updates changed reasons', () => {
		const diff = diffFlags(
			[open('cleaning-due', 'old words'), open('inspection-due', 'due')],
			[flag('cleaning-due', 'new words'), flag('break-in-due', 'new fixture')]
		);
		expect(diff.raise.map((f) => f.kind)).toEqual(['break-in-due']);
		expect(diff.update.map((u) => u.flag.reason)).toEqual(['new words']);
		expect(diff.clear.map((f) => f.kind)).toEqual(['inspection-due']);

		const rows = flagRows(3, diff, now, (kind, raised) => `${kind}:${raised}`);
		expect(rows).toHaveLength(3);
		const raised = rows.find((r) => r.kind === 'break-in-due')!;
		expect(raised).toMatchObject({ id: null, raisedAt: now, raisedByEventId: 'break-in-due:true' });
		const updated = rows.find((r) => r.kind === 'cleaning-due')!;
		// An update keeps when and by what the flag was raised.
		expect(updated).toMatchObject({ id: 7, raisedAt: at, raisedByEventId: 'e-1', clearedAt: null });
		const cleared = rows.find((r) => r.kind === 'inspection-due')!;
		expect(cleared).toMatchObject({ clearedAt: now, clearedByEventId: 'inspection-due:false' });
	});

	it('leaves a flag alone when only the key order of its figures differs', () => {
		const diff = diffFlags(
			[open('drift', 'R rising', { a: 1, b: 2 } as unknown as Flag['figures'])],
			[flag('drift', 'R rising', { b: 2, a: 1 } as unknown as Flag['figures'])]
		);
		expect(diff).toEqual({ raise: [], update: [], clear: [] });
	});

	it('touches only the kinds in scope', () => {
		const diff = diffFlags(
			[open('replace-now', 'worn'), open('cleaning-due', 'due')],
			[],
			['cleaning-due', 'inspection-due']
		);
		expect(diff.clear.map((f) => f.kind)).toEqual(['cleaning-due']);
	});
});
