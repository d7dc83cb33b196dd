import { describe, expect, it } from 'vitest';
import { checkCharacter } from '$lib/domain/fixture-code';
import { MAX_LABELS, labelParams, parseLabelParams, splitCodes } from './labels';

const A = `NM-4K7Q${checkCharacter('4K7Q')}`;
const B = `NM-ZZ29${checkCharacter('ZZ29')}`;
const parse = (q: string) => parseLabelParams(new URLSearchParams(q));

describe('parseLabelParams', () => {
	it('reads codes in any spelling, with defaults for the rest', () => {
		expect(parse(`codes=${A.toLowerCase()},${B.slice(3)}`)).toEqual({
			ok: true,
			request: { source: { codes: [A, B] }, layout: 'shim', paper: 'a4', startAt: 1 }
		});
	});

	it('reads an area or the whole register and every setting', () => {
		expect(parse('area=3&layout=pin&paper=letter&margin=6.5&gap=0&startAt=12')).toEqual({
			ok: true,
			request: {
				source: { areaId: 3 },
				layout: 'pin',
				paper: 'letter',
				margin: 6.5,
				gap: 0,
				startAt: 12
			}
		});
		expect(parse('all=1&margin=&gap=')).toMatchObject({
			ok: true,
			request: { source: { all: true } }
		});
	});

	it('asks for exactly one source', () => {
		expect(parse('layout=pin')).toEqual({
			ok: false,
			fields: { codes: ['Say what to print: codes=…, area=<id> or all=1.'] }
		});
		expect(parse(`codes=${A}&all=1`)).toEqual({
			ok: false,
			fields: { codes: ['Give only one of codes, area or all.'] }
		});
		expect(parse('all=yes')).toMatchObject({ ok: false, fields: { all: [expect.any(String)] } });
		expect(parse('area=x')).toMatchObject({ ok: false, fields: { area: [expect.any(String)] } });
	});

	it('names each bad code with the reason', () => {
		const r = parse(`codes=${A},NM-4K0QX,NM-12`);
		expect(r.ok).toBe(false);
		if (!r.ok) {
			expect(r.fields.codes).toHaveLength(2);
			expect(r.fields.codes[0]).toMatch(/^NM-4K0QX: .*zero/);
			expect(r.fields.codes[1]).toMatch(/^NM-12: /);
		}
	});

	it('gives a message per bad setting', () => {
		const r = parse(`codes=${A}&layout=huge&paper=a3&margin=-2&gap=99&startAt=0`);
		expect(r.ok).toBe(false);
		if (!r.ok) {
			expect(r.fields).toEqual({
				layout: ['Choose Pin, Shim or Block.'],
				paper: ['Choose a4, letter or label.'],
				margin: ['The margin cannot be negative.'],
				gap: ['The gap can be at most 20 mm.'],
				startAt: ['Positions start at 1.']
			});
		}
		const notNumber = parse(`codes=${A}&margin=wide&startAt=2.5`);
		expect(notNumber).toMatchObject({
			ok: false,
			fields: {
				margin: ['Enter the margin in millimetres.'],
				startAt: ['Enter a whole number for the first free position.']
			}
		});
	});

	it(`refuses more than ${MAX_LABELS} codes`, () => {
		const many = Array(MAX_LABELS + 1)
			.fill(A)
			.join(',');
		expect(parse(`codes=${many}`)).toMatchObject({
			ok: false,
			fields: { codes: [expect.any(String)] }
		});
	});
});

describe('labelParams', () => {
	it('writes a query that reads back as the same request', () => {
		const request = {
			source: { codes: [A, B] },
			layout: 'block' as const,
			paper: 'label' as const,
			margin: 4,
			startAt: 3
		};
		expect(parseLabelParams(labelParams(request))).toEqual({ ok: true, request });
	});

	it('splits code lists on commas and white space', () => {
		expect(splitCodes(` ${A}, ${B}\n${A} `)).toEqual([A, B, A]);
	});
});
