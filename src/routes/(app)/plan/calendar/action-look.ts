/**
 * Nestmark's own look for each action on the calendar: a short word, a colour family and a glyph
 * (drawn in ActionGlyph.svelte). The colour is never alone: the word and the glyph go with it.
 * Class strings are written out whole so Tailwind finds them.
 */
import type { WorkOrderAction } from '$lib/schemas/work-orders';

export interface ActionLook {
	/** One or two words that fit a chip. */
	word: string;
	/** Chip background and left border. */
	chip: string;
	/** The glyph's colour. */
	glyph: string;
}

export const ACTION_LOOK: Record<WorkOrderAction, ActionLook> = {
	'replace-balls': {
		word: 'Balls',
		chip: 'bg-[#fbeadf] border-l-[#b4532a]',
		glyph: 'text-[#9a4420]'
	},
	'replace-seats': {
		word: 'Seats',
		chip: 'bg-[#f3e7f6] border-l-[#7b3f8c]',
		glyph: 'text-[#6d3580]'
	},
	'replace-fixture': {
		word: 'Fixture',
		chip: 'bg-[#f9e3e9] border-l-[#9c2f4a]',
		glyph: 'text-[#8c2a43]'
	},
	're-break-in': {
		word: 'Break-in',
		chip: 'bg-[#dff2f3] border-l-[#17707a]',
		glyph: 'text-[#136069]'
	},
	inspect: {
		word: 'Inspect',
		chip: 'bg-[#e6eaf8] border-l-[#3b4fa0]',
		glyph: 'text-[#34468f]'
	},
	clean: {
		word: 'Clean',
		chip: 'bg-[#ebf3de] border-l-[#4f7a1f]',
		glyph: 'text-[#44691a]'
	},
	other: {
		word: 'Other',
		chip: 'bg-[#eceef0] border-l-[#5a5f66]',
		glyph: 'text-[#4d5258]'
	}
};
