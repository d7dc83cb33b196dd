/**
 * Whether the first page of this visit has hydrated. Before that, a browser-side load must give
 * the same data the server rendered; after it, loads may answer from the device first.
 */
let hydrated = false;

/**
 * Called once by the root layout after mount. Also marks the document (`<html data-hydrated>`):
 * input typed before hydration can be reset by it, so scripted visitors (browser tests) wait for
 * the mark before they type.
 */
export function markHydrated(): void {
	hydrated = true;
	document.documentElement.dataset.hydrated = '';
}

/** True after the first page of this visit has hydrated. */
export function isHydrated(): boolean {
	return hydrated;
}
