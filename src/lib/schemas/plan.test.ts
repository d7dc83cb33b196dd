import { describe, expect, it } from 'vitest';
import {
	createFormValues,
	createInput,
	parsePlanQuery,
	planFieldErrors,
	planQueryString
} from './plan';
import { workOrderCreateSchema } from './work-orders';

describe('the planner list’s filters', () => {
	it('reads good filters and writes them back without the defaults', () => {
		const { query, errors } = parsePlanQuery(
			new URLSearchParams(
				'status=scheduled&assignee=Tom@X.example&area=3&action=clean&from=2026-01-01&page=2'
			)
		);
		expect(errors).toBeNull();
		expect(query).toEqual({
			status: 'scheduled',
			assignee: 'tom@x.example',
			area: 3,
			action: 'clean',
			from: '2026-01-01',
			page: 2
		});
		expect(planQueryString(query)).toBe(
			'?status=scheduled&assignee=tom%40x.example&area=3&action=clean&from=2026-01-01&page=2'
		);
		expect(planQueryString(parsePlanQuery(new URLSearchParams()).query)).toBe('');
	});

	it('drops a bad filter and names it, keeping the rest', () => {
		const { query, errors } = parsePlanQuery(
			new URLSearchParams('action=juggle&to=2026-02-30&area=4')
		);
		expect(Object.keys(errors ?? {}).sort()).toEqual(['action', 'to']);
		expect(query.area).toBe(4);
		expect(query.action).toBeUndefined();
		expect(query.status).toBe('open');
	});
});

describe('the new-order form', () => {
	const form = (pairs: [string, string][]) => {
		const f = new FormData();
		for (const [k, v] of pairs) f.append(k, v);
		return f;
	};

	it('reads repeated part lines, drops blank ones, and counts a blank quantity as 1', () => {
		const values = createFormValues(
			form([
				['fixtureCode', 'nm-abcde'],
				['action', 'replace-balls'],
				['partDescription', 'Balls'],
				['partSize', 'Ø 12.7 mm'],
				['partMaterial', ''],
				['partQuantity', ''],
				['partDescription', ''],
				['partSize', ''],
				['partMaterial', ''],
				['partQuantity', '']
			])
		);
		expect(values.parts).toHaveLength(1);
		const parsed = workOrderCreateSchema.parse(createInput(values));
		expect(parsed.fixtureCode).toBe('NM-ABCDE');
		expect(parsed.parts).toEqual([{ description: 'Balls', size: 'Ø 12.7 mm', quantity: 1 }]);
		expect(parsed.dueOn).toBeUndefined();
	});

	it('gives field messages keyed by their path', () => {
		const values = createFormValues(
			form([
				['action', 'other'],
				['partDescription', 'Shim'],
				['partQuantity', '0']
			])
		);
		const parsed = workOrderCreateSchema.safeParse(createInput(values));
		expect(parsed.success).toBe(false);
		const errors = planFieldErrors(parsed.error!);
		expect(errors.fixtureCode).toEqual(['fixtureCode is required.']);
		expect(errors.actionText?.[0]).toMatch(/Say what the work is/);
		expect(errors['parts.0.quantity']).toEqual(['Quantity must be at least 1.']);
	});
});
