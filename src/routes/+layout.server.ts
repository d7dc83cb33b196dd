import { mailViewerEnabled } from '$lib/server/mailbox';
import type { LayoutServerLoad } from './$types';

export const load: LayoutServerLoad = ({ locals }) => {
	return {
		user: locals.user,
		/** The captured-mail viewer exists only in development and test. */
		mailViewer: mailViewerEnabled()
	};
};
