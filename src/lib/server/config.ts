// The one module that reads settings and secrets from the environment.
// Scripts (migrations, seeds, the mail fake) import it too, so it must not use $env.

// Settings named ORRERY_* were PW_* before the rename: the old names work for one release, with a warning.
const warned = new Set<string>();
function read(name: string, fallback?: string): string {
	const v = process.env[name];
	if (v !== undefined && v !== '') return v;
	if (name.startsWith('ORRERY_')) {
		const old = 'PW_' + name.slice('ORRERY_'.length);
		const legacy = process.env[old];
		if (legacy !== undefined && legacy !== '') {
			if (!warned.has(old)) console.warn(`warning: ${old} is the old name of ${name}; it will stop working in the next release`);
			warned.add(old);
			return legacy;
		}
	}
	if (fallback !== undefined) return fallback;
	throw new Error(`environment variable ${name} is not set`);
}

export const config = {
	db: {
		host: read('DB_HOST', '127.0.0.1'),
		port: Number(read('DB_PORT', '3317')),
		database: read('DB_NAME', 'orrery'),
		user: read('DB_USER', 'orrery'),
		password: read('DB_PASSWORD', 'orrery-local')
	},
	smtpUrl: read('SMTP_URL', 'smtp://127.0.0.1:2525'),
	mailFrom: read('MAIL_FROM', 'Orrery <no-reply@orrery.local>'),
	mailDir: read('MAIL_DIR', '.data/mail'),
	origin: read('ORIGIN', 'http://127.0.0.1:3000'),
	/** The development outbox page lists caught mail; never on in production. */
	devOutbox: read('ORRERY_DEV_OUTBOX', '0') === '1',
	production: read('NODE_ENV', 'development') === 'production',
	/** Serves /bench/* pages for `npm run bench` (never set in production). */
	benchPages: read('ORRERY_BENCH_PAGES', '0') === '1'
};
