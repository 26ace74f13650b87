// The one module that reads settings and secrets from the environment.
// Scripts (migrations, seeds, the mail fake) import it too, so it must not use $env.

function read(name: string, fallback?: string): string {
	const v = process.env[name];
	if (v !== undefined && v !== '') return v;
	if (fallback !== undefined) return fallback;
	throw new Error(`environment variable ${name} is not set`);
}

export const config = {
	db: {
		host: read('DB_HOST', '127.0.0.1'),
		port: Number(read('DB_PORT', '3317')),
		database: read('DB_NAME', 'phasewright'),
		user: read('DB_USER', 'phasewright'),
		password: read('DB_PASSWORD', 'phasewright-local')
	},
	smtpUrl: read('SMTP_URL', 'smtp://127.0.0.1:2525'),
	mailFrom: read('MAIL_FROM', 'Phasewright <no-reply@phasewright.local>'),
	mailDir: read('MAIL_DIR', '.data/mail'),
	origin: read('ORIGIN', 'http://127.0.0.1:3000'),
	/** The development outbox page lists caught mail; never on in production. */
	devOutbox: read('PW_DEV_OUTBOX', '0') === '1',
	production: read('NODE_ENV', 'development') === 'production',
	/** Serves /bench/* pages for `npm run bench` (never set in production). */
	benchPages: read('PW_BENCH_PAGES', '0') === '1'
};
