import type { BrowserContext, Page } from '@playwright/test';

/** One thing a page reported that a working page never does. */
export interface PageProblem {
	kind: 'console' | 'pageerror' | 'csp';
	text: string;
	url: string;
}

const BINDING = '__nmReportProblem';

/**
 * Watches every page of `context` from its first script on: console errors, uncaught page
 * errors, and Content-Security-Policy violations (the `securitypolicyviolation` event, which
 * also fires for a refused style or image that the console may word differently).
 * Returns the list, filled as the test runs.
 */
export async function watchProblems(context: BrowserContext): Promise<PageProblem[]> {
	const problems: PageProblem[] = [];
	await context.exposeBinding(BINDING, ({ page }, text: string) => {
		problems.push({ kind: 'csp', text, url: page?.url() ?? '' });
	});
	await context.addInitScript((binding) => {
		document.addEventListener('securitypolicyviolation', (e) => {
			const report = (window as unknown as Record<string, (t: string) => void>)[binding];
			report?.(
				`${e.effectiveDirective} refused ${e.blockedURI || '(inline)'} at ${e.sourceFile}:${e.lineNumber} ${e.sample}`
			);
		});
	}, BINDING);
	const watchPage = (page: Page) => {
		page.on('console', (m) => {
			if (m.type() !== 'error') return;
			// A failed load names the resource only in its location.
			const at = m.location().url;
			const text = at && at !== page.url() ? `${m.text()} (${at})` : m.text();
			problems.push({ kind: 'console', text, url: page.url() });
		});
		page.on('pageerror', (e) =>
			problems.push({ kind: 'pageerror', text: e.message, url: page.url() })
		);
	};
	context.pages().forEach(watchPage);
	context.on('page', watchPage);
	return problems;
}

/** The problems as lines, for an assertion message that says what went wrong. */
export function describeProblems(problems: PageProblem[]): string {
	return problems.map((p) => `${p.kind} on ${p.url}: ${p.text}`).join('\n');
}
