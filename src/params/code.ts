import type { ParamMatcher } from '@sveltejs/kit';
import { normaliseFixtureCode } from '$lib/domain/fixture-code';

/**
 * Fixture codes in URLs, in any spelling a person might type (`nm-4k7qx`); pages redirect to the
 * canonical form. A code that fails its check character is a 404 before any query runs.
 */
export const match: ParamMatcher = (param) => normaliseFixtureCode(param).ok;
