import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { expect, type Page } from '@playwright/test';
import type { Role } from '../../../src/lib/schemas/roles';

/** A demo account as listed in scripts/demo-accounts.txt (the seed creates them). */
export interface DemoAccount {
	role: Role;
	email: string;
	password: string;
}

let cached: DemoAccount[] | undefined;

/** Every demo account, one per role ("role e-mail password" per line). */
export function demoAccounts(): DemoAccount[] {
	cached ??= readFileSync(resolve('scripts/demo-accounts.txt'), 'utf8')
		.split('\n')
		.map((l) => l.trim())
		.filter((l) => l && !l.startsWith('#'))
		.map((l) => {
			const [role, email, password] = l.split(/\s+/);
			return { role: role as Role, email, password };
		});
	return cached;
}

/** The demo account of one role. */
export function demoAccount(role: Role): DemoAccount {
	const account = demoAccounts().find((a) => a.role === role);
	if (!account) throw new Error(`scripts/demo-accounts.txt has no ${role} account`);
	return account;
}

/** How the page is driven: with its scripts (the default) or with JavaScript switched off. */
export interface DriveOptions {
	javaScript?: boolean;
}

/**
 * Waits until the app has hydrated the page (`<html data-hydrated>`), so nothing typed is reset
 * by hydration — under load the first fill can come before it. Nothing to wait for without scripts.
 */
export async function untilHydrated(page: Page, options: DriveOptions = {}): Promise<void> {
	if (options.javaScript === false) return;
	await page.locator('html[data-hydrated]').waitFor({ state: 'attached' });
}

/** Fills in and submits the e-mail + password form (the page must be /signin). */
export async function submitPassword(
	page: Page,
	email: string,
	password: string,
	options: DriveOptions = {}
): Promise<void> {
	await untilHydrated(page, options);
	await page.getByLabel('E-mail', { exact: true }).fill(email);
	await page.getByLabel('Password', { exact: true }).fill(password);
	await page.getByRole('button', { name: 'Sign in', exact: true }).click();
}

/** Signs in through the sign-in page as the demo account of `role`, and waits to leave it. */
export async function signInAs(
	page: Page,
	role: Role,
	next?: string,
	options: DriveOptions = {}
): Promise<DemoAccount> {
	const account = demoAccount(role);
	await page.goto(next ? `/signin?next=${encodeURIComponent(next)}` : '/signin');
	await submitPassword(page, account.email, account.password, options);
	await page.waitForURL((url) => !url.pathname.startsWith('/signin'));
	await expect(page.getByRole('link', { name: 'Sign out' })).toBeVisible();
	return account;
}

/** Signs out through the sign-out page. */
export async function signOut(page: Page): Promise<void> {
	await page.goto('/signout');
	await untilHydrated(page);
	await page.getByRole('button', { name: 'Sign out' }).click();
	await page.waitForURL((url) => url.pathname === '/signin');
}
