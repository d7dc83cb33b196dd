import type { LayoutServerLoad } from './$types';

export const load: LayoutServerLoad = ({ locals }) => {
	const env = process.env.NESTMARK_ENV ?? 'production';
	return {
		user: locals.user,
		/** The captured-mail viewer exists only in development and test. */
		mailViewer: env === 'development' || env === 'test'
	};
};
