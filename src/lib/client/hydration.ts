/**
 * Whether the first page of this visit has hydrated. Before that, a browser-side load must give
 * the same data the server rendered; after it, loads may answer from the device first.
 */
let hydrated = false;

/**
 * Called once, on mount, by OfflineSupport (part of the root layout). Also marks the document
 * (`<html data-hydrated>`): input typed before hydration can be reset by it, so scripted visitors
 * (browser tests) wait for the mark before they type.
 */
export function markHydrated(): void {
	hydrated = true;
	document.documentElement.dataset.hydrated = '';
}

export function isHydrated(): boolean {
	return hydrated;
}
