/**
 * Whether the first page of this visit has hydrated. Before that, a browser-side load must give
 * the same data the server rendered; after it, loads may answer from the device first.
 */
let hydrated = false;

/** Called once by the root layout after mount. */
export function markHydrated(): void {
	hydrated = true;
}

/** True after the first page of this visit has hydrated. */
export function isHydrated(): boolean {
	return hydrated;
}
