/** The audit report PDF's table columns per section: title, relative width, and the cell's text. */
import { reportStamp } from '../content/audit-report';
import type { ReportSection } from '../schemas/audit-report';
import type {
	BreakInRow,
	FlagClearedRow,
	FlagRaisedRow,
	HoldRow,
	InspectionRow,
	OverdueRow,
	PartSwapRow,
	ReportFixture,
	ReportSections
} from '../schemas/audit-report-views';

export interface PdfColumn<T> {
	title: string;
	width: number;
	/** The cell's text (line breaks kept); for the photo column, the words under the pictures. */
	cell: (row: T) => string;
	/** The column that shows the row's photos as thumbnails. */
	photos?: boolean;
}

const fixture = (f: ReportFixture) => `${f.code}\n${f.name}\n${f.area} · ${f.location}`;
const when = (iso: string) => reportStamp(iso);

const inspections: PdfColumn<InspectionRow>[] = [
	{ title: 'When', width: 11, cell: (r) => when(r.occurredAt) },
	{ title: 'Fixture', width: 20, cell: (r) => fixture(r.fixture) },
	{ title: 'By', width: 11, cell: (r) => r.by },
	{
		title: 'Verdict and grades',
		width: 40,
		cell: (r) =>
			[
				r.summary || 'No verdict',
				// Contacts run on in one paragraph, so a row stays a few lines high.
				r.contacts.map((c) => `${c.contact}: ${c.words}`).join('; '),
				...(r.note ? [`Note: ${r.note}`] : [])
			].join('\n')
	},
	{
		title: 'Photos',
		width: 18,
		photos: true,
		cell: (r) =>
			r.photoIds.length
				? `${r.photoIds.length} ${r.photoIds.length === 1 ? 'photo' : 'photos'}`
				: 'none'
	}
];

const breakIn: PdfColumn<BreakInRow>[] = [
	{ title: 'When', width: 11, cell: (r) => when(r.occurredAt) },
	{ title: 'Fixture', width: 21, cell: (r) => fixture(r.fixture) },
	{ title: 'By', width: 11, cell: (r) => r.by },
	{ title: 'Cycles', width: 12, cell: (r) => `${r.cycles} cycles\n${r.readings} readings` },
	{ title: 'Final R', width: 20, cell: (r) => r.finalRWords },
	{ title: 'Outcome', width: 25, cell: (r) => r.outcomeWords + (r.note ? `\nNote: ${r.note}` : '') }
];

const partSwaps: PdfColumn<PartSwapRow>[] = [
	{ title: 'When', width: 11, cell: (r) => when(r.occurredAt) },
	{ title: 'Fixture', width: 24, cell: (r) => fixture(r.fixture) },
	{ title: 'By', width: 13, cell: (r) => r.by },
	{ title: 'Parts', width: 52, cell: (r) => [r.summary, ...r.details].join('\n') }
];

const holds: PdfColumn<HoldRow>[] = [
	{ title: 'When', width: 11, cell: (r) => when(r.occurredAt) },
	{ title: 'Fixture', width: 24, cell: (r) => fixture(r.fixture) },
	{ title: 'By', width: 13, cell: (r) => r.by },
	{ title: 'Entry', width: 10, cell: (r) => (r.kind === 'hold' ? 'Hold' : 'Release') },
	{ title: 'Reason', width: 42, cell: (r) => r.reason }
];

const flagsRaised: PdfColumn<FlagRaisedRow>[] = [
	{ title: 'Raised', width: 11, cell: (r) => when(r.raisedAt) },
	{ title: 'Fixture', width: 22, cell: (r) => fixture(r.fixture) },
	{ title: 'Flag', width: 12, cell: (r) => r.kindWords },
	{ title: 'Reason', width: 42, cell: (r) => r.reason },
	{ title: 'Cleared', width: 13, cell: (r) => (r.clearedAt ? when(r.clearedAt) : 'still open') }
];

const flagsCleared: PdfColumn<FlagClearedRow>[] = [
	{ title: 'Cleared', width: 11, cell: (r) => `${when(r.clearedAt)}\n${r.openFor}` },
	{ title: 'Fixture', width: 21, cell: (r) => fixture(r.fixture) },
	{ title: 'Flag', width: 11, cell: (r) => `${r.kindWords}\nraised ${when(r.raisedAt)}` },
	{ title: 'Reason it was raised', width: 33, cell: (r) => r.reason },
	{ title: 'What cleared it', width: 24, cell: (r) => r.clearedBy }
];

const overdue: PdfColumn<OverdueRow>[] = [
	{ title: 'Fixture', width: 24, cell: (r) => fixture(r.fixture) },
	{ title: 'Flag', width: 13, cell: (r) => r.kindWords },
	{ title: 'Raised', width: 13, cell: (r) => `${when(r.raisedAt)}\n${r.openFor}` },
	{ title: 'Reason', width: 50, cell: (r) => r.reason }
];

/** Columns of each section's table. */
export const PDF_COLUMNS: {
	[S in ReportSection]: PdfColumn<ReportSections[S]['rows'][number]>[];
} = {
	inspections,
	'break-in': breakIn,
	'part-swaps': partSwaps,
	holds,
	'flags-raised': flagsRaised,
	'flags-cleared': flagsCleared,
	overdue
};
