import { z } from 'zod';

// Zod compiles object parsers with `new Function` when it may, probing once with a caught
// `Function('')`. Under the app's Content-Security-Policy (no 'unsafe-eval') that probe is still
// reported as a violation on every page; the interpreted parsers are plenty fast for the phone.
z.config({ jitless: true });
