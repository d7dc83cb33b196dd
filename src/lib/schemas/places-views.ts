/** Places as pickers, filters and the CSV import see them: plain types, no I/O. */

/** A location with the names of the places above it. */
export interface LocationPath {
	siteId: number;
	site: string;
	areaId: number;
	area: string;
	locationId: number;
	location: string;
}

/** Sites with their areas and locations, in name order, for pickers and filters. */
export interface SiteNode {
	id: number;
	name: string;
	areas: { id: number; name: string; locations: { id: number; name: string }[] }[];
}
