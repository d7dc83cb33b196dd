/**
 * Canonical JSON: sorted keys, no spaces, undefined members left out, dates as ISO text. Equal
 * content always gives the same text, so it can be hashed (event content hashes) and compared
 * (stored state against a rebuild, flag figures). Its own module because ingest, the state store,
 * the health jobs and the register all need it and none of them should import another for it.
 */
export function canonicalJson(value: unknown): string {
	if (value === null || typeof value !== 'object') return JSON.stringify(value);
	if (value instanceof Date) return JSON.stringify(value.toISOString());
	if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
	const obj = value as Record<string, unknown>;
	return `{${Object.keys(obj)
		.filter((k) => obj[k] !== undefined)
		.sort()
		.map((k) => `${JSON.stringify(k)}:${canonicalJson(obj[k])}`)
		.join(',')}}`;
}
