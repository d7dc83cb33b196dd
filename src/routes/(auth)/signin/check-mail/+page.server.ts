import type { PageServerLoad } from './$types';

export const load: PageServerLoad = () => {
	const environment = process.env.NESTMARK_ENV ?? 'production';
	return { environment, mailCaptured: environment === 'development' || environment === 'test' };
};
